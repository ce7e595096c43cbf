/**
 * The JSON the public API answers with, as one set of types: the server's presenters annotate their
 * results with them and the client's API modules read them (src/features/<feature>/api). Times are
 * `Date` where the server holds them; `Wire<T>` is what the client receives after JSON.stringify
 * (a Date becomes its ISO string, an undefined field is left out).
 */
import type { EntryDocumentJson, EntryEstimateJson, Track, UncertaintyKind } from './vocabulary';

export type { Track, UncertaintyKind };

/** T as JSON.stringify writes it and the client parses it back. */
export type Wire<T> =
  T extends Date ? string
  : T extends (infer U)[] ? Wire<U>[]
  : T extends readonly (infer U)[] ? readonly Wire<U>[]
  : T extends object ? { [K in keyof T]: Wire<T[K]> }
  : T;

// ------------------------------------------------------------------ documents

/** An entry document (schemas/entry.schema.json, through shared/schema.generated.ts). */
export type EntryDocument = EntryDocumentJson;
/** One estimate of an entry document. */
export type EntryEstimate = EntryEstimateJson;
