import { describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import {
  canonicalJson,
  challengeChecksum,
  LIMITS,
  loadChallenge,
  validateChallenge,
  type ChallengeError,
  type ChallengeSpec,
} from '../../../shared/physics/challenge';
import { sha256, sha256Hex } from '../../../shared/physics/sha256';

const fixture = (name: string) => JSON.parse(readFileSync(`tests/fixtures/challenges/${name}.json`, 'utf8')) as ChallengeSpec;
const base = (): ChallengeSpec => fixture('chain-small');
const errorsOf = (x: unknown): ChallengeError[] => {
  const r = validateChallenge(x);
  if (r.ok) throw new Error('expected validation errors');
  return r.errors;
};

describe('SHA-256', () => {
  it('FIPS 180-2 appendix B vectors', () => {
    // B.1 one block "abc"
    expect(sha256Hex('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    // B.2 two blocks
    expect(sha256Hex('abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq')).toBe(
      '248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1',
    );
    // B.3 one million 'a'
    expect(sha256Hex('a'.repeat(1_000_000))).toBe('cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0');
    // empty message (FIPS 180-4 example values, widely published)
    expect(sha256Hex('')).toBe('e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855');
  });

  it("agrees with Node's crypto at every length around the block and padding boundaries", () => {
    let seed = 7;
    for (let len = 0; len <= 200; len++) {
      const bytes = new Uint8Array(len);
      for (let i = 0; i < len; i++) bytes[i] = (seed = (seed * 1103515245 + 12345) & 0x7fffffff) & 0xff;
      const want = createHash('sha256').update(bytes).digest('hex');
      expect(Buffer.from(sha256(bytes)).toString('hex')).toBe(want);
    }
    const text = 'Parallax: ⟨Z⟩ ± σ — 量子';
    expect(sha256Hex(text)).toBe(createHash('sha256').update(text, 'utf8').digest('hex'));
  });
});

describe('canonical JSON and checksum', () => {
  it('sorts keys, drops whitespace, writes numbers as JSON.stringify does', () => {
    expect(canonicalJson({ b: 1, a: [1.5, 'x', { d: null, c: true }], e: undefined })).toBe('{"a":[1.5,"x",{"c":true,"d":null}],"b":1}');
    expect(canonicalJson({ x: 1e21, y: -0.000001, z: 0.1 + 0.2 })).toBe('{"x":1e+21,"y":-0.000001,"z":0.30000000000000004}');
    expect(() => canonicalJson({ x: Infinity })).toThrow(/non-finite/);
  });

  it('checksum ignores key order and whitespace but not content; $schema is left out', () => {
    const a = base();
    const reordered = JSON.parse(JSON.stringify(a, Object.keys(a).reverse())) as ChallengeSpec;
    const b = JSON.parse(JSON.stringify({ ...reordered, lattice: a.lattice, circuit: a.circuit, observables: a.observables }, null, 2));
    expect(challengeChecksum(b)).toBe(challengeChecksum(a));
    expect(challengeChecksum({ ...a, $schema: '../schemas/challenge.schema.json' })).toBe(challengeChecksum(a));
    expect(challengeChecksum({ ...a, version: 2 })).not.toBe(challengeChecksum(a));
    expect(challengeChecksum(a)).toBe(sha256Hex(canonicalJson(a)));
    expect(loadChallenge(a).checksum).toMatch(/^[0-9a-f]{64}$/);
  });
});

describe('schema validation', () => {
  it('accepts the fixtures', () => {
    for (const f of ['chain-small', 'heavy-hex', 'gates-small']) {
      const r = validateChallenge(fixture(f));
      expect(r.ok, JSON.stringify(r)).toBe(true);
    }
  });

  it('names the field and the fix', () => {
    expect(errorsOf({ ...base(), id: 'Chain 48' })).toEqual([
      { path: '/id', message: '"id" is not in the right form: use lower-case letters, digits and single hyphens, e.g. "chain-48"' },
    ]);
    const { title: _t, ...noTitle } = base();
    void _t;
    expect(errorsOf(noTitle)[0]).toEqual({ path: '', message: 'the challenge is missing the required field "title"; add it' });
    expect(errorsOf({ ...base(), colour: 'red' })[0]).toEqual({ path: '/colour', message: 'the challenge has an unknown field "colour"; remove it or check its spelling' });
    expect(errorsOf({ ...base(), lattice: { kind: 'hex', n: 4 } })[0]).toEqual({
      path: '/lattice/kind',
      message: '"lattice.kind" must be one of "chain", "ring", "square", "heavy-hex", "edges"',
    });
    expect(errorsOf({ ...base(), lattice: { kind: 'chain' } })[0].message).toBe('"lattice" is missing the required field "n"; add it');
    expect(errorsOf({ ...base(), lattice: { kind: 'chain', n: 20000 } })[0]).toEqual({ path: '/lattice/n', message: '"lattice.n" must be <= 10000' });
    expect(errorsOf({ ...base(), version: 1.5 })[0].message).toBe('"version" must be an integer');
    const dupSteps = base();
    (dupSteps.circuit as { steps: number[] }).steps = [1, 2, 1];
    expect(errorsOf(dupSteps)[0].message).toMatch(/"circuit.steps" items 0 and 2 are identical/);
    const both = base();
    both.observables[0] = { id: 'z0', pauli: 'Z0', terms: [{ coef: 1, pauli: 'Z1' }] } as never;
    expect(errorsOf(both)[0]).toEqual({
      path: '/observables/0',
      message: '"observables.0" must have exactly one of "pauli" (a single Pauli string) or "terms" (a weighted sum), not both and not neither',
    });
    const badGate = fixture('gates-small');
    (badGate.circuit as { gates: unknown[] }).gates[0] = { name: 'ccx', qubits: [0, 1] };
    expect(errorsOf(badGate)[0].path).toBe('/circuit/gates/0/name');
  });

  it('rejects non-finite numbers (strictNumbers) and non-objects', () => {
    const s = base();
    (s.circuit as { thetaH: number[] }).thetaH = [0, Infinity];
    expect(errorsOf(s)[0].path).toBe('/circuit/thetaH/1');
    const n = base();
    (n.circuit as { thetaH: number[] }).thetaH = [NaN];
    expect(errorsOf(n)[0].path).toBe('/circuit/thetaH/0');
    expect(errorsOf(null)[0].message).toBe('the challenge must be an object');
    expect(errorsOf('{}')[0].path).toBe('');
  });

  it('stops at the first schema error on untrusted input (no allErrors)', () => {
    const s = { ...base(), id: 'BAD ID', version: -1, title: '' };
    expect(errorsOf(s).length).toBe(1);
  });
});

describe('semantic checks', () => {
  it('qubit out of range in an observable names the qubit, the register and the path', () => {
    const s = base();
    s.observables.push({ id: 'far', pauli: 'Z3 X12' });
    expect(errorsOf(s)).toEqual([
      {
        path: '/observables/5/pauli',
        message: 'observable "far": Pauli string "Z3 X12" at character 5: qubit 12 is out of range: the register has 12 qubits (0 to 11)',
      },
    ]);
  });

  it('duplicate observable ids', () => {
    const s = base();
    s.observables.push({ id: 'z0', pauli: 'Z1' });
    expect(errorsOf(s)[0]).toEqual({ path: '/observables/5/id', message: 'observable id "z0" is already used by observable 0; give each observable its own id' });
  });

  it('explicit edge lists: self-loops, out of range, repeats (either orientation)', () => {
    const s = { ...base(), lattice: { kind: 'edges' as const, n: 12, edges: [[0, 1], [2, 2], [3, 12], [1, 0]] } };
    const e = errorsOf(s);
    expect(e.map((x) => x.path)).toEqual(['/lattice/edges/1', '/lattice/edges/2', '/lattice/edges/3']);
    expect(e[0].message).toMatch(/joins qubit 2 to itself/);
    expect(e[1].message).toMatch(/names qubit 12, but the lattice has n = 12 qubits \(0 to 11\)/);
    expect(e[2].message).toMatch(/repeats edge 0/);
  });

  it('lattice size limit (max qubits 10,000) across kinds', () => {
    expect(LIMITS.maxQubits).toBe(10_000);
    // square 101 x 100 = 10,100 qubits
    expect(errorsOf({ ...base(), lattice: { kind: 'square', rows: 101, cols: 100 } })[0].message).toMatch(/10100 qubits, more than the limit of 10000; make rows or cols smaller/);
    // heavy-hex 40 x 40: 5*1600 + 160 + 160 - 1 = 8319 qubits: allowed by size
    const hh = validateChallenge({ ...base(), lattice: { kind: 'heavy-hex', rows: 40, cols: 40 } });
    expect(hh.ok).toBe(true);
    expect(errorsOf({ ...base(), lattice: { kind: 'heavy-hex', rows: 45, cols: 45 } })[0].path).toBe('/lattice');
  });

  it('gates family: arity, parameters, qubit range, qubit count vs lattice', () => {
    const s = fixture('gates-small');
    const c = s.circuit as { qubits: number; gates: unknown[] };
    c.gates.push({ name: 'cx', qubits: [0] }, { name: 'rx', qubits: [1] }, { name: 'h', qubits: [6] }, { name: 'cz', qubits: [2, 2] }, { name: 'x', qubits: [0], params: [1] });
    const e = errorsOf(s);
    expect(e.map((x) => x.message)).toEqual([
      'gate 19 (cx) acts on 2 qubits but lists 1',
      'gate 20 (rx) needs one angle in radians: "params": [theta]',
      'gate 21 (h) names qubit 6, but the circuit has 6 qubits (0 to 5)',
      'gate 22 (cz) names qubit 2 twice; a two-qubit gate needs two different qubits',
      'gate 23 (x) takes no parameters; remove "params"',
    ]);
    expect(e[0].path).toBe('/circuit/gates/19/qubits');
    const t = fixture('gates-small');
    (t.circuit as { qubits: number }).qubits = 7;
    expect(errorsOf(t)[0]).toEqual({ path: '/circuit/qubits', message: 'circuit.qubits is 7 but the lattice has 6 qubits; make them equal' });
  });

  it('colliding instance ids and the target limit (100,000)', () => {
    const s = base();
    (s.circuit as { thetaH: number[] }).thetaH = [0.1, 0.1000001];
    expect(errorsOf(s)[0].message).toMatch(/agree to 6 decimals, so their instance ids collide/);
    const exact = base();
    (exact.circuit as { thetaH: number[] }).thetaH = [0.5, 0.2, 0.5];
    expect(errorsOf(exact)[0]).toEqual({
      path: '/circuit/thetaH/2',
      message: 'thetaH[2] = 0.5 and thetaH[0] = 0.5 agree to 6 decimals, so their instance ids collide; remove one or space them further apart',
    });
    const big = base();
    (big.circuit as { steps: number[]; thetaH: number[] }).steps = Array.from({ length: 100 }, (_, i) => i);
    (big.circuit as { steps: number[]; thetaH: number[] }).thetaH = Array.from({ length: 201 }, (_, i) => i * 0.001);
    // 100 x 201 instances x 5 observables = 100,500 targets > 100,000
    expect(errorsOf(big)[0].message).toBe('20100 instances x 5 observables = 100500 targets, more than the limit of 100000; shrink the grid or the observable list');
  });

  it('instance gate budget', () => {
    const s = { ...base(), lattice: { kind: 'chain' as const, n: 10000 } };
    (s.circuit as { steps: number[] }).steps = [1, 60];
    // 60 * (10000 + 9999) = 1,199,940 > 1,000,000 (the limit a public QASM download can carry: issue 12 item 11)
    expect(errorsOf(s)[0].message).toMatch(/compiles to 1199940 gates, more than the limit of 1000000/);
    // 50 steps: 999,950 gates, within the limit
    (s.circuit as { steps: number[] }).steps = [1, 50];
    expect(validateChallenge(s).ok).toBe(true);
  });

  it('enumerates instances and targets on success', () => {
    const c = loadChallenge(fixture('heavy-hex'));
    expect(c.nQubits).toBe(49);
    expect(c.instances.length).toBe(9);
    expect(c.targets.length).toBe(36);
    expect(c.observables[3].terms[0].factors.map((f) => f.qubit)).toEqual([3, 4, 5]);
    expect(() => loadChallenge({})).toThrow(/invalid challenge/);
  });
});
