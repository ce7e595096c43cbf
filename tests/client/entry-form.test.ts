/**
 * The submit form's TSV paste and row mapping (src/features/submit/lib/entry-form.ts), issue 13:
 * kinds are mapped by an explicit list of spellings, never guessed; an unknown kind is an error
 * naming the row as the table numbers it (from 1) and the allowed values; a misspelt method family
 * stays as typed and is reported; a hardware team's new entry starts in the hardware track.
 * Expected values are the schema's enums (schemas/entry.schema.json) and the table's own numbering.
 */
import { describe, expect, it } from 'vitest';
import {
  describePath, documentFromForm, emptyForm, formFromDocument, kindFromCell, localProblems, mergeProblems, rowsFromTsv, rowsInMessage, UNCERTAINTY_KINDS,
} from '@/features/submit/lib/entry-form';

const challenge = { id: 'ring-36-correlators', version: 1, checksum: `sha256:${'a'.repeat(64)}` };

describe('pasting rows from a spreadsheet', () => {
  it('maps the known spellings of each kind explicitly ("syst" is systematic, not statistical)', () => {
    const { rows, problems } = rowsFromTsv('t1:z0\t0.5\t0.01\tsyst\nt2:z0\t0.4\t0.02\tStat\nt3:z0\t0.3\t0.03\tbnd\nt4:z0\t0.2\t0\texact');
    expect(rows.map((r) => r.kind)).toEqual(['systematic', 'statistical', 'bound', 'none']);
    expect(problems).toEqual([]);
    expect(kindFromCell(' SYSTEMATIC ')).toBe('systematic');
    expect(kindFromCell('sigma')).toBeNull();
  });

  it('an unknown kind stays as typed and is an error naming the row (from 1, where the paste landed) and the allowed values', () => {
    const { rows, problems } = rowsFromTsv('target\tvalue\tu\tkind\nt1:z0\t0.5\t0.01\tstatistical\nt2:z0\t0.4\t0.02\tshot noise', 'statistical', 4);
    expect(rows).toHaveLength(2);
    expect(rows[1].kind).toBe('shot noise');
    expect(problems).toEqual([{ path: '/estimates/5/uncertaintyKind', message: `row 6: "shot noise" is not an uncertainty kind; use one of ${UNCERTAINTY_KINDS.join(', ')}` }]);
    expect(UNCERTAINTY_KINDS).toEqual(['statistical', 'systematic', 'bound', 'none']);
  });

  it('skips a header line, reads comma- or semicolon-separated lines, keeps the default kind when none is given, and the Unicode minus', () => {
    const { rows } = rowsFromTsv('target,value,uncertainty\nt1:z0,\u22120.25,0.01\nt2:z0;0.5;0.02', 'bound');
    expect(rows.map((r) => [r.target, r.value, r.uncertainty, r.kind])).toEqual([['t1:z0', '\u22120.25', '0.01', 'bound'], ['t2:z0', '0.5', '0.02', 'bound']]);
    const doc = documentFromForm({ ...emptyForm(challenge), estimates: rows });
    expect(doc.estimates[0]).toEqual({ target: 't1:z0', value: -0.25, uncertainty: 0.01, uncertaintyKind: 'bound' });
  });
});

describe('row mapping and the form model', () => {
  it('a misspelt method family stays as typed and is reported with the allowed families; it never becomes another family', () => {
    const f = formFromDocument({ track: 'classical', label: 'x', method: { family: 'tensor-netwrok' }, estimates: [{ target: 't1:z0', value: 1, uncertainty: 0, uncertaintyKind: 'syst' }] }, challenge);
    expect(f.family).toBe('tensor-netwrok');
    expect(documentFromForm(f).method?.family).toBe('tensor-netwrok');
    const ps = localProblems(f);
    expect(ps.map((p) => p.path)).toEqual(['/method/family', '/estimates/0/uncertaintyKind']);
    expect(ps[0].message).toContain('"tensor-netwrok" is not a method family; use one of error-mitigated-hardware, tensor-network');
    expect(ps[1].message).toMatch(/^row 1: "syst" is not an uncertainty kind/);
  });

  it('a document without a track or family keeps them empty and asks for them instead of picking one', () => {
    const f = formFromDocument({ label: 'x', estimates: [] }, challenge);
    expect([f.track, f.family]).toEqual(['', '']);
    expect(localProblems(f).map((p) => p.message)).toEqual(['choose a track: hardware or classical', expect.stringMatching(/^choose a method family: /)]);
  });

  it("a hardware team's new entry starts in the hardware track with the hardware family; others in the classical track", () => {
    expect(emptyForm(challenge, 'hardware')).toMatchObject({ track: 'hardware', family: 'error-mitigated-hardware' });
    expect(emptyForm(challenge)).toMatchObject({ track: 'classical', family: 'tensor-network' });
    expect(emptyForm(challenge, 'both')).toMatchObject({ track: 'classical' });
  });

  it('rows are named as the table numbers them, from 1, in labels and inside messages', () => {
    expect(describePath('/estimates/0/uncertaintyKind')).toBe('row 1, kind');
    expect(describePath('/estimates/11')).toBe('row 12');
    expect(describePath('/method/family')).toBe('/method/family');
    expect(rowsInMessage('"t1:z0" appears twice (first at /estimates/2): give one estimate per target')).toBe('"t1:z0" appears twice (first at row 3 (/estimates/2)): give one estimate per target');
  });

  it('merges the server\'s and the form\'s problems, one per cell, in document order', () => {
    const server = [{ path: '/estimates/10/value', message: 'value must be a number' }, { path: '/estimates/2/uncertaintyKind', message: 'server words' }];
    const local = [{ path: '/estimates/2/uncertaintyKind', message: 'form words' }, { path: '/method/family', message: 'family' }];
    expect(mergeProblems(server, local)).toEqual([
      { path: '/estimates/2/uncertaintyKind', message: 'server words' },
      { path: '/estimates/10/value', message: 'value must be a number' },
      { path: '/method/family', message: 'family' },
    ]);
  });
});
