/** A reference as a caller sees it: a sealed value is withheld until its date (server/queries/visibility.ts). */
import type { references } from '../db/schema';
import { isVisibleNow, PUBLIC_VIEWER, type Viewer } from '../queries/visibility';
import type { ReferenceSize, ReferenceView } from '@shared/api-types';

type RefRow = typeof references.$inferSelect | null;

export function presentReference(ref: RefRow, now: Date, viewer: Viewer = PUBLIC_VIEWER): ReferenceView {
  if (!ref) return { status: 'pending' as const };
  if (!isVisibleNow(ref, viewer, now)) return { status: 'sealed' as const, sealedUntil: ref.sealedUntil };
  if (ref.value === null) return { status: 'none' as const, reason: ref.reason, engineVersion: ref.engineVersion };
  return { status: 'exact' as const, value: ref.value, uncertainty: ref.uncertainty, method: ref.method, size: ref.size as ReferenceSize, wallMs: ref.wallMs, engineVersion: ref.engineVersion, createdAt: ref.createdAt,
    // a moderator who may see a sealed value is told that it is still sealed for the public
    ...(isVisibleNow(ref, PUBLIC_VIEWER, now) ? {} : { sealedUntil: ref.sealedUntil }) };
}
