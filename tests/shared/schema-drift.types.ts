/**
 * Type-level half of the drift check (tests/shared/schema-drift.test.ts runs tsc on this file; `npm
 * run typecheck` checks it too): the hand-written document types must have the shape the JSON
 * Schemas give (shared/schema.generated.ts): the same property names at every level, the same
 * required ones, the same enums and primitive types. A property added to a schema and not to the
 * TypeScript type, or the other way round, makes `Same<...>` false and this file fail to compile.
 */
import type { ChallengeSpec, GateJson } from '@shared/physics/challenge';
import type { LatticeSpec } from '@shared/physics/lattices';
import type { ObservableJson } from '@shared/physics/observable';
import type { GateName } from '@shared/physics/circuit';
import type { EntryDocument, EntryEstimate } from '@shared/api-types';
import type { ChallengeGate, ChallengeLattice, ChallengeObservable, ChallengeSpecJson, EntryDocumentJson, EntryEstimate as EntryEstimateGenerated } from '@shared/schema.generated';
import type { SchemaGateName } from '@shared/vocabulary';

/** exact equality of two types (not mere assignability) */
type Equals<A, B> = (<T>() => T extends A ? 1 : 2) extends (<T>() => T extends B ? 1 : 2) ? true : false;
/** keys whose property may be left out */
type OptionalKeys<T> = { [K in keyof T]-?: object extends Pick<T, K> ? K : never }[keyof T];
/**
 * The shape of a type as a schema sees it: objects become {key: [required?, shape]}, arrays
 * (mutable or readonly) become {'[]': shape}, unions are kept member by member, primitives and
 * literal types stay as they are.
 */
export type Shape<T> =
  T extends readonly (infer U)[] ? { '[]': Shape<U> }
  : T extends object ? { [K in keyof T]-?: [K extends OptionalKeys<T> ? 'optional' : 'required', Shape<Exclude<T[K], undefined>>] }
  : T;
export type Same<A, B> = Equals<Shape<A>, Shape<B>>;
/** compiles only when its argument is `true` */
export const assertTrue = <T extends true>(t?: T): T | undefined => t;

// the challenge spec: hand-written (shared/physics/challenge-spec.ts and the engine modules) against the schema
assertTrue<Same<ChallengeSpec, ChallengeSpecJson>>();
assertTrue<Same<LatticeSpec, ChallengeLattice>>();
assertTrue<Same<ObservableJson, ChallengeObservable>>();
assertTrue<Same<GateJson, ChallengeGate>>();
assertTrue<Equals<GateName, SchemaGateName>>();
// the entry document: the API's type is the generated one (shared/api-types.ts)
assertTrue<Same<EntryDocument, EntryDocumentJson>>();
assertTrue<Same<EntryEstimate, EntryEstimateGenerated>>();

// the check itself can fail: a missing, an extra or an optional-instead-of-required property, a wider enum
assertTrue<Equals<Same<{ a: string }, { a: string; b?: number }>, false>>();
assertTrue<Equals<Same<{ a: string; b: number }, { a: string }>, false>>();
assertTrue<Equals<Same<{ a: { b?: string } }, { a: { b: string } }>, false>>();
assertTrue<Equals<Same<{ k: 'x' | 'y' }, { k: 'x' }>, false>>();
assertTrue<Equals<Same<{ k: string }, { k: 'x' }>, false>>();
assertTrue<Equals<Same<{ e: number[][] }, { e: readonly (readonly number[])[] }>, true>>();
