import { Link } from 'react-router';
import { queryClient } from '@/lib/query-client';
import { getChallengesQueryOptions } from '@/features/challenges/api/get-challenges';
import { ChallengeCatalogue } from '@/features/challenges/components/challenge-catalogue';
import { TrackMark } from '@/components/ui';

export async function loader() {
  // warm the cache without holding the page: the list shows its own loading state
  void queryClient.prefetchQuery(getChallengesQueryOptions());
  return null;
}

export function Component() {
  return (
    <div className="grid grid-cols-1 gap-8 lg:grid-cols-[minmax(0,22rem)_minmax(0,1fr)] lg:grid-rows-[auto_1fr] lg:gap-x-14 lg:gap-y-6">
      <section aria-labelledby="about" className="max-w-prose lg:col-start-1 lg:row-start-1">
        <h1 id="about" className="text-2xl sm:text-3xl">One quantity, two viewpoints.</h1>
        <p className="mt-3 text-ink-soft">
          Parallax is a curated arena for expectation values of quantum circuits. Teams running error-mitigated circuits on
          quantum processors and teams simulating the same circuits classically post their estimates, each with its
          uncertainty. The server computes exact references wherever a known method can, scores every estimate against
          them, and where none exists compares the estimates with each other.
        </p>
      </section>
      <section aria-labelledby="challenges-title" className="lg:col-start-2 lg:row-span-2 lg:row-start-1">
        <div className="mb-3 flex flex-wrap items-baseline justify-between gap-x-3 border-b border-rule pb-2">
          <h2 id="challenges-title" className="text-xl">Challenges</h2>
          <span className="text-sm text-ink-soft">open to browse, no sign-in needed · <Link to="/challenges">the full table</Link></span>
        </div>
        <ChallengeCatalogue layout="cards" />
      </section>
      <aside aria-label="How to read Parallax" className="max-w-prose lg:col-start-1 lg:row-start-2">
        <ApertureFigure />
        <dl className="mt-6 space-y-3 text-sm">
          <div className="flex gap-3">
            <dt className="mt-1"><TrackMark track="hardware" /></dt>
            <dd><span className="font-medium">Quantum hardware</span> — mitigated values with the raw data behind them.</dd>
          </div>
          <div className="flex gap-3">
            <dt className="mt-1"><TrackMark track="classical" /></dt>
            <dd><span className="font-medium">Classical simulation</span> — tensor networks, Pauli propagation, light cones and more.</dd>
          </div>
        </dl>
      </aside>
    </div>
  );
}

/**
 * The idea in one small drawing: two estimates (hardware diamond, classical circle) with their
 * intervals, seen against one exact line and a consensus band.
 */
function ApertureFigure() {
  return (
    <figure className="rounded-card border border-rule bg-paper-raised p-4">
      <svg viewBox="0 0 320 110" className="w-full" role="img" aria-labelledby="fig-cap">
        <rect x="10" y="38" width="300" height="26" className="fill-consensus-soft" />
        <line x1="10" x2="310" y1="49" y2="49" strokeWidth="1.5" className="stroke-exact" />
        <g className="stroke-hardware" strokeWidth="1.5">
          <line x1="95" x2="95" y1="22" y2="78" />
          <line x1="89" x2="101" y1="22" y2="22" />
          <line x1="89" x2="101" y1="78" y2="78" />
        </g>
        <path d="M95 42l8 8-8 8-8-8z" className="fill-hardware" />
        <g className="stroke-classical" strokeWidth="1.5">
          <line x1="215" x2="215" y1="38" y2="56" />
          <line x1="209" x2="221" y1="38" y2="38" />
          <line x1="209" x2="221" y1="56" y2="56" />
        </g>
        <circle cx="215" cy="47" r="6" strokeWidth="2" className="fill-paper-raised stroke-classical" />
        <text x="12" y="100" className="fill-ink-soft text-[10px]">exact reference</text>
        <text x="308" y="100" textAnchor="end" className="fill-ink-soft text-[10px]">consensus band</text>
      </svg>
      <figcaption id="fig-cap" className="mt-2 text-xs text-ink-soft">
        Every estimate is a value with its interval, drawn against the exact reference (firm line) or, where none
        exists, the consensus of all entries (soft band).
      </figcaption>
    </figure>
  );
}
