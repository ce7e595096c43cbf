/** Beside a checksum: how it is made, and the download whose sha256sum equals it. */
import { Link } from 'react-router';
import { CHECKSUM_RECIPE, canonicalSpecPath } from '@shared/physics/checksum-recipe';

export function ChecksumNote({ slug, version }: { slug: string; version: number }) {
  return (
    <details className="w-full text-xs text-ink-soft" data-testid="checksum-recipe">
      <summary className="cursor-pointer">How the checksum is made</summary>
      <p className="mt-1 max-w-prose">
        The {CHECKSUM_RECIPE} <a href={canonicalSpecPath(slug, version)} download data-testid="canonical-spec">Download those exact bytes</a>: <code>sha256sum</code> of
        the file prints this checksum. <Link to="/api-reference#checksum">More in the API reference</Link>.
      </p>
    </details>
  );
}
