/**
 * The document-sized steps of an entry check, on a document held between them: parse (strict
 * JSON, then the schema), check (against the version's targets), the document itself, the score
 * preview. A document thread (server/jobs/document-thread.ts) holds one session; without threads
 * (unit tests, benches) the same session runs in the calling thread.
 */
import type { FieldProblem } from '../../errors';
import { parseStrictJson } from '../../util/strict-json';
import { checkEstimates, summarize, type DocumentSummary, type EstimateChecks } from './checks';
import { scorePreview, type PublicReference, type ScorePreview } from './preview';
import { schemaProblems } from './schema';
import { MAX_DEPTH, MAX_PROBLEMS, type EntryDocument, type Problems, type VersionTargets } from './types';

export type ParseOutcome =
  | { ok: false; problems: FieldProblem[]; total: number }
  | { ok: true; summary: DocumentSummary; schema: Problems };

export class EntryDocumentSession {
  private doc: unknown = undefined;

  /** bytes or text: strict JSON; anything else: an already parsed value */
  parse(input: Uint8Array | string | unknown): ParseOutcome {
    let doc = input;
    if (typeof input === 'string' || input instanceof Uint8Array) {
      const r = parseStrictJson(input, { maxDepth: MAX_DEPTH, maxProblems: MAX_PROBLEMS });
      if (!r.ok) return { ok: false, problems: r.problems, total: r.problems.length };
      doc = r.value;
    }
    this.doc = doc;
    return { ok: true, summary: summarize(doc), schema: schemaProblems(doc) };
  }

  check(vt: VersionTargets): EstimateChecks {
    return checkEstimates(this.doc, vt);
  }

  document(): EntryDocument {
    return this.doc as EntryDocument;
  }

  preview(a: { targetKeys: string[]; refs: Map<string, PublicReference>; listLimit?: number }): ScorePreview {
    return scorePreview(this.doc as EntryDocument, a.targetKeys, a.refs, a.listLimit);
  }

  end(): void {
    this.doc = undefined;
  }
}
