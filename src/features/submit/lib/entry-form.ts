/**
 * The submit form's model: editable strings for every field, converted to and from an entry
 * document (schemas/entry.schema.json). The options (tracks, method families, uncertainty kinds)
 * and limits come from the schema itself, so the form and the server never disagree. Values that
 * do not parse are sent as they are typed: the server's validation then names the field and the
 * fix, with the same JSON pointer the form uses to mark the field.
 */
import schema from '../../../../schemas/entry.schema.json';
import type { EntryDocument, EntryDocumentEstimate } from '@/features/entries/api/get-entry';
import { ENTRY_FORMAT_LIMITS, METHOD_FAMILIES as VOCABULARY_METHOD_FAMILIES, TRACKS as VOCABULARY_TRACKS, UNCERTAINTY_KINDS as VOCABULARY_UNCERTAINTY_KINDS, type MethodFamily, type Track, type UncertaintyKind } from '@shared/vocabulary';

type Obj = Record<string, unknown>;
const props = schema.properties;

// the lists hold strings here: the form keeps whatever was typed or loaded, known or not
export const TRACKS: readonly string[] = VOCABULARY_TRACKS;
export const METHOD_FAMILIES: readonly string[] = VOCABULARY_METHOD_FAMILIES;
export const UNCERTAINTY_KINDS: readonly string[] = VOCABULARY_UNCERTAINTY_KINDS;
export const LIMITS = ENTRY_FORMAT_LIMITS;
/** above this many estimates the table is not editable in the browser (fix the file instead) */
export const EDITABLE_ROWS = 2000;

export const FAMILY_LABELS: Record<MethodFamily, string> & Record<string, string | undefined> = {
  'error-mitigated-hardware': 'Error-mitigated hardware',
  'tensor-network': 'Tensor network',
  'pauli-propagation': 'Pauli propagation',
  'neural-quantum-state': 'Neural quantum state',
  'monte-carlo': 'Monte Carlo',
  exact: 'Exact',
  other: 'Other',
};
export const TRACK_LABELS: Record<Track, string> & Record<string, string | undefined> = { hardware: 'Quantum hardware', classical: 'Classical simulation' };
export const KIND_HINT: Record<UncertaintyKind, string> & Record<string, string | undefined> = {
  statistical: 'statistical (shots, sampling)',
  systematic: 'systematic (truncation, extrapolation)',
  bound: 'bound (a rigorous error bound)',
  none: 'none (claimed exact, u = 0)',
};

/** the numeric and text fields of `resources`, from the schema */
export const RESOURCE_FIELDS = (Object.keys(props.resources.properties) as (keyof typeof props.resources.properties)[])
  .filter((k) => k !== 'software')
  .map((k) => {
    const p = props.resources.properties[k] as { type?: string; $ref?: string; maxLength?: number };
    return { key: k as string, numeric: p.type === 'integer' || p.type === 'number' || Boolean(p.$ref), integer: p.type === 'integer', maxLength: p.maxLength };
  });
export const RESOURCE_LABELS: Record<string, string> = {
  wallTimeSeconds: 'Wall time (s)', cpuCoreHours: 'CPU core-hours', gpuHours: 'GPU hours', qpuSeconds: 'QPU seconds',
  memoryGiB: 'Memory (GiB)', qubitsUsed: 'Qubits used', hardware: 'Hardware', device: 'Device', commit: 'Code commit',
};
export const LINK_FIELDS = Object.keys(props.links.properties);
export const LINK_LABELS: Record<string, string> = { code: 'Code (URL)', preprint: 'Preprint (URL)', doi: 'DOI' };

let seq = 0;
export const rowId = () => `r${++seq}`;

export interface EstimateRow { id: string; target: string; value: string; uncertainty: string; kind: string; extra: Obj }
export interface SettingRow { id: string; key: string; value: string }
export interface EntryForm {
  challenge: { id: string; version: number; checksum: string };
  label: string;
  track: string;
  family: string;
  description: string;
  settings: SettingRow[];
  resources: Record<string, string>;
  /** parts of resources the form does not edit (software list), kept as they came */
  resourcesExtra: Obj;
  links: Record<string, string>;
  license: string;
  notes: string;
  estimates: EstimateRow[];
}

export const emptyRow = (): EstimateRow => ({ id: rowId(), target: '', value: '', uncertainty: '', kind: 'statistical', extra: {} });

/** the method family a new entry of this track starts with */
export const DEFAULT_FAMILY: Record<string, string> = { hardware: 'error-mitigated-hardware', classical: 'tensor-network' };

/** a new entry: in the team's track (a hardware team's entries start in the hardware track) */
export function emptyForm(challenge: EntryForm['challenge'], track: string = 'classical'): EntryForm {
  const t = TRACKS.includes(track) ? track : 'classical';
  return {
    challenge, label: '', track: t, family: DEFAULT_FAMILY[t] ?? 'other', description: '',
    settings: [], resources: {}, resourcesExtra: {}, links: {}, license: 'CC-BY-4.0', notes: '', estimates: [emptyRow()],
  };
}

const str = (x: unknown) => (x === undefined || x === null ? '' : typeof x === 'string' ? x : typeof x === 'object' ? JSON.stringify(x) : String(x));

/** a document (from a file or a stored draft) into the form; `challenge` fills what the file lacks */
export function formFromDocument(raw: unknown, challenge: EntryForm['challenge']): EntryForm {
  const d = (raw && typeof raw === 'object' ? raw : {}) as Obj;
  const m = (d.method ?? {}) as Obj;
  const res = (d.resources ?? {}) as Obj;
  const { software, ...resRest } = res;
  const ch = (d.challenge ?? {}) as Partial<EntryForm['challenge']>;
  const ests = Array.isArray(d.estimates) ? (d.estimates as Obj[]) : [];
  return {
    challenge: { id: ch.id ?? challenge.id, version: ch.version ?? challenge.version, checksum: ch.checksum ?? challenge.checksum },
    // an unknown or missing track or family is kept as it came (the form marks it), never replaced by another
    label: str(d.label), track: str(d.track), family: str(m.family), description: str(m.description),
    settings: Object.entries((m.settings ?? {}) as Obj).map(([key, v]) => ({ id: rowId(), key, value: str(v) })),
    resources: Object.fromEntries(Object.entries(resRest).map(([k, v]) => [k, str(v)])),
    resourcesExtra: software !== undefined ? { software } : {},
    links: Object.fromEntries(Object.entries((d.links ?? {}) as Obj).map(([k, v]) => [k, str(v)])),
    license: str(d.license), notes: str(d.notes),
    estimates: ests.map((e) => {
      const { target, value, uncertainty, uncertaintyKind, ...extra } = (e && typeof e === 'object' ? e : {}) as EntryDocumentEstimate;
      return { id: rowId(), target: str(target), value: str(value), uncertainty: str(uncertainty), kind: str(uncertaintyKind), extra };
    }),
  };
}

/** "0.5" → 0.5; anything else is sent as typed so the server names the problem */
function num(s: string): number | string {
  const t = s.trim().replace(/\u2212/g, '-');
  if (t === '') return s;
  const n = Number(t);
  return Number.isFinite(n) ? n : s;
}
function settingValue(s: string): unknown {
  const t = s.trim();
  if (t === 'true') return true;
  if (t === 'false') return false;
  if (t !== '' && Number.isFinite(Number(t))) return Number(t);
  if (t.startsWith('[')) { try { return JSON.parse(t); } catch { /* a string then */ } }
  return s;
}
const nonEmpty = (o: Obj) => (Object.keys(o).length ? o : undefined);

export function documentFromForm(f: EntryForm): EntryDocument {
  const settings: Obj = {};
  for (const s of f.settings) if (s.key.trim()) settings[s.key.trim()] = settingValue(s.value);
  const resources: Obj = { ...f.resourcesExtra };
  for (const r of RESOURCE_FIELDS) {
    const v = f.resources[r.key]?.trim();
    if (v) resources[r.key] = r.numeric ? num(v) : v;
  }
  const links: Obj = {};
  for (const k of LINK_FIELDS) { const v = f.links[k]?.trim(); if (v) links[k] = v; }
  const doc: Obj = {
    challenge: f.challenge,
    track: f.track,
    label: f.label,
    method: { family: f.family, ...(f.description.trim() ? { description: f.description } : {}), ...(Object.keys(settings).length ? { settings } : {}) },
    resources: nonEmpty(resources),
    links: nonEmpty(links),
    license: f.license.trim() || undefined,
    notes: f.notes.trim() ? f.notes : undefined,
    estimates: f.estimates.map((r) => ({ target: r.target, value: num(r.value), uncertainty: num(r.uncertainty), uncertaintyKind: r.kind, ...r.extra })),
  };
  for (const k of Object.keys(doc)) if (doc[k] === undefined) delete doc[k];
  return doc as unknown as EntryDocument;
}

/**
 * Spellings of the uncertainty kinds that a spreadsheet may hold, mapped explicitly (compared in
 * lower case, without surrounding spaces). Anything else is not guessed: the paste reports it.
 */
export const KIND_ALIASES: Record<string, string> = {
  statistical: 'statistical', stat: 'statistical', stats: 'statistical', 'stat.': 'statistical', statistic: 'statistical',
  systematic: 'systematic', sys: 'systematic', syst: 'systematic', 'syst.': 'systematic', 'sys.': 'systematic', systematics: 'systematic',
  bound: 'bound', bnd: 'bound', 'error bound': 'bound',
  none: 'none', exact: 'none',
};

/** the uncertainty kind a cell names, or null when it names none of them */
export function kindFromCell(cell: string): string | null {
  return KIND_ALIASES[cell.trim().toLowerCase()] ?? null;
}

export interface PastedRows { rows: EstimateRow[]; problems: Problem[] }

/**
 * Rows pasted from a spreadsheet (tab- or comma-separated): target, value, uncertainty[, kind].
 * A first line whose value column is not a number is taken for a header and skipped. A kind is
 * mapped by KIND_ALIASES; an unknown one stays in the row as typed and is reported, with the row
 * numbered as the table shows it (from 1; `firstRow` is the 0-based table row of the first line).
 */
export function rowsFromTsv(text: string, defaultKind = 'statistical', firstRow = 0): PastedRows {
  const lines = text.replace(/\r/g, '').split('\n').filter((l) => l.trim());
  const rows: EstimateRow[] = [];
  const problems: Problem[] = [];
  lines.forEach((line, i) => {
    const cells = (line.includes('\t') ? line.split('\t') : line.split(/[,;]/)).map((c) => c.trim());
    if (i === 0 && cells.length > 1 && !Number.isFinite(Number(cells[1].replace(/\u2212/g, '-')))) return;
    const at = firstRow + rows.length;
    let kind = defaultKind;
    if (cells[3]) {
      const k = kindFromCell(cells[3]);
      if (k) kind = k;
      else {
        kind = cells[3];
        problems.push({ path: `/estimates/${at}/uncertaintyKind`, message: `row ${at + 1}: "${cells[3]}" is not an uncertainty kind; use one of ${UNCERTAINTY_KINDS.join(', ')}` });
      }
    }
    rows.push({ id: rowId(), target: cells[0] ?? '', value: cells[1] ?? '', uncertainty: cells[2] ?? '', kind, extra: {} });
  });
  return { rows, problems };
}

/**
 * What the form can tell before asking the server: a track, method family or uncertainty kind
 * that is not one of the schema's values (each named with the allowed ones), rows numbered from 1.
 */
export function localProblems(f: EntryForm): Problem[] {
  const out: Problem[] = [];
  if (!TRACKS.includes(f.track)) out.push({ path: '/track', message: f.track ? `"${f.track}" is not a track; use one of ${TRACKS.join(', ')}` : `choose a track: ${TRACKS.join(' or ')}` });
  if (!METHOD_FAMILIES.includes(f.family)) out.push({ path: '/method/family', message: f.family ? `"${f.family}" is not a method family; use one of ${METHOD_FAMILIES.join(', ')}` : `choose a method family: ${METHOD_FAMILIES.join(', ')}` });
  f.estimates.forEach((r, i) => {
    if (!UNCERTAINTY_KINDS.includes(r.kind)) out.push({ path: `/estimates/${i}/uncertaintyKind`, message: `row ${i + 1}: "${r.kind}" is not an uncertainty kind; use one of ${UNCERTAINTY_KINDS.join(', ')}` });
  });
  return out;
}

/** Problems of both sources, one per pointer and message, in the order of the document. */
export function mergeProblems(a: Problem[], b: Problem[]): Problem[] {
  const seen = new Set<string>();
  const out: Problem[] = [];
  for (const p of [...a, ...b]) {
    const l = locate(p.path);
    // one message per cell: the server's wording wins over the form's for the same field
    const key = l.kind === 'cell' ? `${l.row}:${l.column}` : p.path;
    if (seen.has(key)) continue;
    seen.add(key);
    out.push(p);
  }
  return out.sort((x, y) => x.path.localeCompare(y.path, 'en', { numeric: true }));
}

/** "/estimates/3/value" as the table says it: "row 4, value"; other pointers as they are */
export function describePath(path: string): string {
  const m = /^\/estimates\/(\d+)(?:\/([^/]+))?/.exec(path);
  if (!m) return path || '(document)';
  const col = m[2] ? ESTIMATE_FIELD[m[2]] ?? m[2] : null;
  return `row ${Number(m[1]) + 1}${col ? `, ${col}` : ''}`;
}

/** pointers into the estimates inside a message, with the row the table shows: "/estimates/2" -> "row 3 (/estimates/2)" */
export function rowsInMessage(message: string): string {
  return message.replace(/\/estimates\/(\d+)(?![\d/])/g, (all, n: string) => `row ${Number(n) + 1} (${all})`);
}

// ------------------------------------------------------------------ problems by field
export interface Problem { path: string; message: string }
const ESTIMATE_FIELD: Record<string, string> = { target: 'target', value: 'value', uncertainty: 'uncertainty', uncertaintyKind: 'kind' };

/** where a pointer lands in the form: a table cell, a row, or a named form field */
export function locate(path: string): { kind: 'cell'; row: number; column: string } | { kind: 'row'; row: number } | { kind: 'field'; field: string } | { kind: 'none' } {
  const m = /^\/estimates\/(\d+)(?:\/([^/]+))?/.exec(path);
  if (m) {
    const row = Number(m[1]);
    const col = m[2] ? ESTIMATE_FIELD[m[2]] : undefined;
    return col ? { kind: 'cell', row, column: col } : { kind: 'row', row };
  }
  if (path === '/estimates') return { kind: 'field', field: 'estimates' };
  const f = /^\/(challenge|label|track|license|notes)(?:\/|$)/.exec(path);
  if (f) return { kind: 'field', field: f[1] };
  if (path.startsWith('/method/family')) return { kind: 'field', field: 'family' };
  if (path.startsWith('/method/description')) return { kind: 'field', field: 'description' };
  const s = /^\/method\/settings\/([^/]+)/.exec(path);
  if (s) return { kind: 'field', field: `settings/${s[1].replace(/~1/g, '/').replace(/~0/g, '~')}` };
  if (path.startsWith('/method/settings')) return { kind: 'field', field: 'settings' };
  const r = /^\/(resources|links)\/([^/]+)/.exec(path);
  if (r) return { kind: 'field', field: `${r[1]}/${r[2]}` };
  if (/^\/(resources|links)$/.test(path)) return { kind: 'field', field: path.slice(1) };
  return { kind: 'none' };
}

/** the id of the form control a pointer names, for "go to field" links */
export function controlId(path: string): string | null {
  const l = locate(path);
  if (l.kind === 'cell') return `est-${l.row}-${l.column}`;
  if (l.kind === 'row') return `est-${l.row}-target`;
  if (l.kind === 'field') return `f-${l.field.replace(/[^a-zA-Z0-9-]/g, '-')}`;
  return null;
}
