/**
 * How a challenge version's checksum is made, in words, for the pages and the API reference (the
 * code is challengeChecksum and canonicalJson in challenge.ts).
 */
export const CHECKSUM_RECIPE =
  'SHA-256 (lower-case hex) of the canonical JSON of the spec without its "$schema" member: UTF-8, no whitespace, object keys sorted by UTF-16 code units at every level, array order kept, strings and numbers written as JavaScript\'s JSON.stringify writes them (shortest round-trip numbers: 1.5707963267948966, 0.25, 1e-7).';

/** where the exact bytes can be downloaded, so that `sha256sum` of the file prints the checksum */
export const canonicalSpecPath = (slug: string, version?: number) => `/api/challenges/${encodeURIComponent(slug)}/spec.canonical.json${version ? `?version=${version}` : ''}`;
