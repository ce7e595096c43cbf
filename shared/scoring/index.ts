/** Public API of the scoring library (SCORING.md). Plain TypeScript, no framework imports. */
export type { UncertaintyKind, Measurement, Estimate, Reference, ConsistencyTest } from './types';
export { regularizedGammaP, regularizedGammaQ, chiSquaredCdf, chiSquaredSurvival, erf, erfc, normalCdf, normalPdf, normalQuantile } from './special';
export { createRng, type Rng } from './prng';
export {
  zScore,
  classifyZ,
  zetaScore,
  enScore,
  crpsNormal,
  intervalScore,
  scoreAgainstReference,
  scoreSweep,
  type ZClass,
  type ExactScore,
  type ExactScoreOptions,
  type SweepItem,
  type SweepStats,
  type EntrySweepScore,
} from './exact';
export { DEFAULT_ALPHA, consistencyTest, partitionByUncertainty, chi2About, weightedMean, type WeightedMeanResult } from './weighted-mean';
export { randomEffects, pauleMandelTau2, remlTau2, type TauMethod, type RandomEffectsResult } from './random-effects';
export { largestConsistentSubset, type LcsOptions, type LcsResult } from './lcs';
export { median, medianWithUncertainty, algorithmA, type MedianOptions, type MedianResult, type AlgorithmAOptions, type AlgorithmAResult } from './robust';
export { consensus, CONSENSUS_ESTIMATORS, DEFAULT_ESTIMATOR, type ConsensusEstimator, type ConsensusOptions, type ConsensusResult } from './consensus';
export {
  degreesOfEquivalence,
  pairwiseEquivalence,
  equivalenceRatio,
  entryAgreement,
  type DegreeOfEquivalence,
  type PairwiseEquivalence,
  type EntryAgreement,
} from './equivalence';
export {
  richardsonCoefficients,
  richardson,
  polynomialFit,
  linearFit,
  exponentialFit,
  exponentialFreeAsymptoteFit,
  zneSummary,
  type NoisePoint,
  type ZneModelResult,
  type FitOptions,
  type ExponentialOptions,
  type ZneSummaryOptions,
  type ZneSummary,
} from './zne';
export {
  rankEntries,
  accuracyCostFront,
  DEFAULT_RANKING_KEYS,
  type RankingEntry,
  type RankingKey,
  type RankedEntry,
  type FrontPoint,
  type CostFront,
} from './ranking';
export { crpsCensoredNormal, expectedCrpsNormal } from './proper';
export {
  SCORING_RULES_VERSION,
  PREVIOUS_SCORING_RULES_VERSION,
  EXACT_TOLERANCE,
  MIN_INDEPENDENT_TEAMS,
  BOOTSTRAP_REPLICATES,
  BOOTSTRAP_SEED,
  NEAR_COPY_RELATIVE,
  NEAR_COPY_FRACTION,
  NEAR_COPY_MIN_SHARED,
  boundOf,
  exactTolerance,
  withinTolerance,
  onePerTeam,
  findNearCopies,
  bootstrapRankIntervals,
  type NearCopy,
  type NearCopyInput,
  type CandidateEstimate,
} from './rules';
