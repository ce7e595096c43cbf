/**
 * Challenge specs: schema validation (schemas/challenge.schema.json, ajv 2020-12, strict mode, first
 * error only so untrusted input cannot make the validator collect unbounded error lists), semantic
 * checks, canonical serialisation and SHA-256 checksum, instance and target enumeration.
 *
 * Errors are {path: JSON pointer into the spec, message naming the field and the fix}.
 */
import { Ajv2020 } from 'ajv/dist/2020.js';
import type { ErrorObject, ValidateFunction } from 'ajv';
import schema from '../../schemas/challenge.schema.json';
import type { ObservableSpec } from './circuit';
import { GATE_ARITY, GATE_PARAMS } from './circuit';
import { enumerateInstances, enumerateTargets, type Instance, type Target } from './compile';
import { latticeQubits, type LatticeSpec } from './lattices';
import { ObservableError, parseObservable } from './observable';
import { sha256Hex } from './sha256';
import type { ChallengeSpec } from './challenge-spec';
import { CHALLENGE_FORMAT_LIMITS } from '../vocabulary';

export type { ChallengeSpec, GateJson, GatesCircuitJson, KickedIsingCircuitJson } from './challenge-spec';

export interface ChallengeError {
  /** JSON pointer into the spec ("" for the whole document) */
  path: string;
  message: string;
}

export const LIMITS = {
  /** the schema's qubit count limit, also applied to rows x cols lattices */
  maxQubits: CHALLENGE_FORMAT_LIMITS.qubits,
  maxTargets: 100_000,
  /**
   * compiled gates in one instance (kicked-ising: steps * (qubits + edges)). One million covers a
   * 10,000-qubit chain to 50 steps or a 68-qubit heavy-hex patch to 6,000; the QASM of such an
   * instance is about 30 MB (5,000,000 made a 162 MB download: issue 12, item 11).
   */
  maxGatesPerInstance: 1_000_000,
  /** Pauli terms summed over all observables */
  maxTotalTerms: 1_000_000,
} as const;

export interface ValidatedChallenge {
  spec: ChallengeSpec;
  /** lower-case hex SHA-256 of canonicalJson(spec without "$schema") */
  checksum: string;
  nQubits: number;
  /** parsed observables, in spec order */
  observables: ObservableSpec[];
  instances: Instance[];
  targets: Target[];
}

export type ValidationResult = { ok: true; challenge: ValidatedChallenge } | { ok: false; errors: ChallengeError[] };

let validator: ValidateFunction | null = null;
function getValidator(): ValidateFunction {
  if (!validator) {
    const ajv = new Ajv2020({ strict: true, strictNumbers: true, discriminator: true, allErrors: false });
    validator = ajv.compile(schema);
  }
  return validator;
}

/** Validate untrusted input: schema first (stops at the first error), then semantic checks. */
export function validateChallenge(input: unknown): ValidationResult {
  const validate = getValidator();
  if (!validate(input)) {
    const errs = (validate.errors ?? []).slice(0, 5).map(describeAjvError);
    return { ok: false, errors: errs.length ? errs : [{ path: '', message: 'the challenge does not match the schema' }] };
  }
  const spec = input as ChallengeSpec;
  const errors: ChallengeError[] = [];
  const nQubits = semanticLattice(spec, errors);
  if (errors.length) return { ok: false, errors };
  semanticCircuit(spec, nQubits, errors);
  const observables = semanticObservables(spec, nQubits, errors);
  if (errors.length) return { ok: false, errors: errors.slice(0, 50) };
  const instances = enumerateInstances(spec);
  const targets = enumerateTargets(spec);
  return { ok: true, challenge: { spec, checksum: challengeChecksum(spec), nQubits, observables, instances, targets } };
}

/** Validate and throw ChallengeValidationError on failure (for scripts and tests). */
export function loadChallenge(input: unknown): ValidatedChallenge {
  const r = validateChallenge(input);
  if (!r.ok) throw new ChallengeValidationError(r.errors);
  return r.challenge;
}

export class ChallengeValidationError extends Error {
  constructor(readonly errors: ChallengeError[]) {
    super(`invalid challenge:\n${errors.map((e) => `  ${e.path || '/'}: ${e.message}`).join('\n')}`);
    this.name = 'ChallengeValidationError';
  }
}

function semanticLattice(spec: ChallengeSpec, errors: ChallengeError[]): number {
  const lat = spec.lattice;
  const n = latticeQubits(lat);
  if (n > LIMITS.maxQubits) {
    errors.push({
      path: '/lattice',
      message: `lattice has ${n} qubits, more than the limit of ${LIMITS.maxQubits}; make ${lat.kind === 'square' || lat.kind === 'heavy-hex' ? 'rows or cols' : 'n'} smaller`,
    });
  }
  if (lat.kind === 'edges') {
    const seen = new Map<string, number>();
    lat.edges.forEach(([a, b], k) => {
      const path = `/lattice/edges/${k}`;
      if (a === b) errors.push({ path, message: `edge ${k} joins qubit ${a} to itself; an edge needs two different qubits` });
      for (const q of [a, b]) {
        if (q >= lat.n) errors.push({ path, message: `edge ${k} names qubit ${q}, but the lattice has n = ${lat.n} qubits (0 to ${lat.n - 1}); raise n or fix the edge` });
      }
      const key = `${Math.min(a, b)},${Math.max(a, b)}`;
      const prev = seen.get(key);
      if (prev !== undefined) errors.push({ path, message: `edge ${k} [${a}, ${b}] repeats edge ${prev}; list each edge once` });
      else seen.set(key, k);
    });
  }
  return n;
}

function edgeCount(lat: LatticeSpec): number {
  switch (lat.kind) {
    case 'chain':
      return Math.max(0, lat.n - 1);
    case 'ring':
      return lat.n;
    case 'square':
      return 2 * lat.rows * lat.cols - lat.rows - lat.cols;
    case 'heavy-hex':
      return 6 * lat.rows * lat.cols + 4 * lat.rows + 4 * lat.cols - 2;
    case 'edges':
      return lat.edges.length;
  }
}

function semanticCircuit(spec: ChallengeSpec, n: number, errors: ChallengeError[]): void {
  const c = spec.circuit;
  if (c.family === 'gates') {
    if (c.qubits !== n) {
      errors.push({ path: '/circuit/qubits', message: `circuit.qubits is ${c.qubits} but the lattice has ${n} qubits; make them equal` });
    }
    for (let k = 0; k < c.gates.length && errors.length < 50; k++) {
      const g = c.gates[k];
      const path = `/circuit/gates/${k}`;
      const arity = GATE_ARITY[g.name];
      if (g.qubits.length !== arity) {
        errors.push({ path: `${path}/qubits`, message: `gate ${k} (${g.name}) acts on ${arity} qubit${arity > 1 ? 's' : ''} but lists ${g.qubits.length}` });
      }
      const np = GATE_PARAMS[g.name];
      const got = g.params?.length ?? 0;
      if (got !== np) {
        errors.push({
          path: `${path}/params`,
          message: np ? `gate ${k} (${g.name}) needs one angle in radians: "params": [theta]` : `gate ${k} (${g.name}) takes no parameters; remove "params"`,
        });
      }
      for (const q of g.qubits) {
        if (q >= c.qubits) errors.push({ path: `${path}/qubits`, message: `gate ${k} (${g.name}) names qubit ${q}, but the circuit has ${c.qubits} qubits (0 to ${c.qubits - 1})` });
      }
      if (g.qubits.length === 2 && g.qubits[0] === g.qubits[1]) {
        errors.push({ path: `${path}/qubits`, message: `gate ${k} (${g.name}) names qubit ${g.qubits[0]} twice; a two-qubit gate needs two different qubits` });
      }
    }
    return;
  }
  const ids = new Map<string, number>();
  c.thetaH.forEach((h, k) => {
    const id = h.toFixed(6);
    const prev = ids.get(id);
    if (prev !== undefined) {
      errors.push({
        path: `/circuit/thetaH/${k}`,
        message: `thetaH[${k}] = ${h} and thetaH[${prev}] = ${c.thetaH[prev]} agree to 6 decimals, so their instance ids collide; remove one or space them further apart`,
      });
    } else ids.set(id, k);
  });
  const maxSteps = Math.max(...c.steps);
  const gates = maxSteps * (n + edgeCount(spec.lattice));
  if (gates > LIMITS.maxGatesPerInstance) {
    errors.push({
      path: '/circuit/steps',
      message: `the deepest instance (steps = ${maxSteps}) compiles to ${gates} gates, more than the limit of ${LIMITS.maxGatesPerInstance}; use fewer steps or a smaller lattice`,
    });
  }
}

function semanticObservables(spec: ChallengeSpec, n: number, errors: ChallengeError[]): ObservableSpec[] {
  const out: ObservableSpec[] = [];
  const ids = new Map<string, number>();
  let totalTerms = 0;
  for (let k = 0; k < spec.observables.length && errors.length < 50; k++) {
    const o = spec.observables[k];
    const path = `/observables/${k}`;
    const prev = ids.get(o.id);
    if (prev !== undefined) {
      errors.push({ path: `${path}/id`, message: `observable id "${o.id}" is already used by observable ${prev}; give each observable its own id` });
    } else ids.set(o.id, k);
    totalTerms += 'terms' in o ? o.terms.length : 1;
    try {
      out.push(parseObservable(o, n));
    } catch (e) {
      if (e instanceof ObservableError) errors.push({ path: path + e.issue.path, message: `observable "${o.id}": ${e.issue.message}` });
      else throw e;
    }
  }
  if (totalTerms > LIMITS.maxTotalTerms) {
    errors.push({ path: '/observables', message: `the observables have ${totalTerms} Pauli terms in all, more than the limit of ${LIMITS.maxTotalTerms}` });
  }
  const instances = spec.circuit.family === 'gates' ? 1 : spec.circuit.steps.length * spec.circuit.thetaH.length;
  const targets = instances * spec.observables.length;
  if (targets > LIMITS.maxTargets) {
    errors.push({
      path: '/observables',
      message: `${instances} instances x ${spec.observables.length} observables = ${targets} targets, more than the limit of ${LIMITS.maxTargets}; shrink the grid or the observable list`,
    });
  }
  return out;
}

const FIELD_HINTS: Record<string, string> = {
  '^[a-z0-9]+(-[a-z0-9]+)*$': 'use lower-case letters, digits and single hyphens, e.g. "chain-48"',
  '^[A-Za-z0-9][A-Za-z0-9_.-]*$': 'use letters, digits, "_", "." and "-", starting with a letter or digit (no ":" or spaces)',
};

function describeAjvError(e: ErrorObject): ChallengeError {
  const path = e.instancePath;
  const field = path === '' ? 'the challenge' : `"${path.split('/').slice(1).join('.')}"`;
  const p = e.params as Record<string, unknown>;
  switch (e.keyword) {
    case 'required':
      return { path, message: `${field} is missing the required field "${String(p.missingProperty)}"; add it` };
    case 'additionalProperties':
      return {
        path: `${path}/${String(p.additionalProperty)}`,
        message: `${field} has an unknown field "${String(p.additionalProperty)}"; remove it or check its spelling`,
      };
    case 'type':
      return { path, message: `${field} must be ${article(String(p.type))}${p.type === 'number' ? ' (finite)' : ''}` };
    case 'enum':
      return { path, message: `${field} must be one of ${(p.allowedValues as unknown[]).map((v) => JSON.stringify(v)).join(', ')}` };
    case 'const':
      return { path, message: `${field} must be ${JSON.stringify(p.allowedValue)}` };
    case 'discriminator': {
      const tag = String(p.tag);
      const allowed = tag === 'kind' ? '"chain", "ring", "square", "heavy-hex" or "edges"' : '"kicked-ising" or "gates"';
      return {
        path: `${path}/${tag}`,
        message: p.error === 'tag' ? `${field}.${tag} must be a string: ${allowed}` : `${field}.${tag} must be ${allowed}`,
      };
    }
    case 'pattern': {
      const hint = FIELD_HINTS[String(p.pattern)];
      return { path, message: `${field} is not in the right form${hint ? `: ${hint}` : ` (pattern ${String(p.pattern)})`}` };
    }
    case 'minLength':
    case 'maxLength':
      return { path, message: `${field} must have ${e.keyword === 'minLength' ? 'at least' : 'at most'} ${String(p.limit)} characters` };
    case 'minItems':
    case 'maxItems':
      return { path, message: `${field} must have ${e.keyword === 'minItems' ? 'at least' : 'at most'} ${String(p.limit)} items` };
    case 'minimum':
    case 'maximum':
    case 'exclusiveMinimum':
    case 'exclusiveMaximum':
      return { path, message: `${field} must be ${String(p.comparison)} ${String(p.limit)}` };
    case 'uniqueItems': {
      const [lo, hi] = [Number(p.i), Number(p.j)].sort((a, b) => a - b);
      return { path: `${path}/${hi}`, message: `${field} items ${lo} and ${hi} are identical; remove the duplicate` };
    }
    case 'oneOf':
      if (/^\/observables\/\d+$/.test(path)) {
        return { path, message: `${field} must have exactly one of "pauli" (a single Pauli string) or "terms" (a weighted sum), not both and not neither` };
      }
      return { path, message: `${field} does not match any allowed form` };
    default:
      return { path, message: `${field} ${e.message ?? 'is invalid'}` };
  }
}

function article(t: string): string {
  return /^[aeiou]/.test(t) ? `an ${t}` : `a ${t}`;
}

/**
 * Canonical JSON: object keys sorted by UTF-16 code units, no whitespace, numbers and strings as
 * JSON.stringify writes them, undefined object members dropped. Throws on non-finite numbers.
 */
export function canonicalJson(value: unknown): string {
  if (value === null) return 'null';
  switch (typeof value) {
    case 'number':
      if (!Number.isFinite(value)) throw new Error(`canonicalJson: non-finite number ${value}`);
      return JSON.stringify(value);
    case 'string':
    case 'boolean':
      return JSON.stringify(value);
    case 'object': {
      if (Array.isArray(value)) return `[${value.map((v) => (v === undefined ? 'null' : canonicalJson(v))).join(',')}]`;
      const obj = value as Record<string, unknown>;
      const keys = Object.keys(obj)
        .filter((k) => obj[k] !== undefined)
        .sort();
      return `{${keys.map((k) => `${JSON.stringify(k)}:${canonicalJson(obj[k])}`).join(',')}}`;
    }
    default:
      throw new Error(`canonicalJson: cannot serialise a ${typeof value}`);
  }
}

/** SHA-256 (hex) of the canonical JSON of the spec; "$schema" is a pointer, not content, and is left out. */
export function challengeChecksum(spec: ChallengeSpec): string {
  const { $schema: _ignored, ...rest } = spec;
  void _ignored;
  return sha256Hex(canonicalJson(rest));
}

export { enumerateInstances, enumerateTargets };
export type { Instance, Target };
