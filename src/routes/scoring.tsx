/**
 * "How scoring works": the public statement of the scoring rules. Every number on this page comes
 * from shared/scoring (the rules version, the tolerance, the bootstrap settings) and the worked
 * example is computed by the same computeStandings the server runs, so the page cannot drift
 * from the rules it describes.
 */
import { Link } from 'react-router';
import { computeStandings, type StandingsEntryInput } from '@shared/scoring/standings';
import {
  BOOTSTRAP_REPLICATES, BOOTSTRAP_SEED, EXACT_TOLERANCE, MIN_INDEPENDENT_TEAMS, NEAR_COPY_FRACTION, NEAR_COPY_MIN_SHARED, NEAR_COPY_RELATIVE, SCORING_RULES_VERSION,
} from '@shared/scoring/rules';
import { formatSig } from '@/lib/format';
import { PageHeader, Panel } from '@/components/ui';

const est = (pairs: Record<string, [number, number]>) => new Map(Object.entries(pairs).map(([k, [value, uncertainty]]) => [k, { value, uncertainty, kind: 'statistical' as const }]));
const row = (id: string, label: string, pairs: Record<string, [number, number]>, minute: number): StandingsEntryInput => ({
  id, label, teamId: `team-${id}`, teamName: label, track: 'classical', methodFamily: 'other', submittedAt: `2026-01-01T00:0${minute}:00Z`, isBaseline: false, cost: {}, estimates: est(pairs),
});

/** The worked example: invented numbers, B = 1 for both targets. */
function example() {
  const targets = [
    { key: 'A (exact reference 0.500)', reference: { value: 0.5, uncertainty: 0 }, bound: 1 },
    { key: 'B (no exact reference)', reference: null, bound: 1 },
  ];
  const entries = [
    row('p', 'Team P: 0.52 ± 0.02, 0.31 ± 0.02', { [targets[0].key]: [0.52, 0.02], [targets[1].key]: [0.31, 0.02] }, 1),
    row('q', 'Team Q: 0.47 ± 0.03, 0.28 ± 0.03', { [targets[0].key]: [0.47, 0.03], [targets[1].key]: [0.28, 0.03] }, 2),
    row('w', 'Team W: 0.52 ± 0.50, 0.31 ± 0.50 (inflated)', { [targets[0].key]: [0.52, 0.5], [targets[1].key]: [0.31, 0.5] }, 3),
    row('x', 'Team X: 0.500 exact, B not answered', { [targets[0].key]: [0.5 + 1e-16, 0] }, 4),
  ];
  return { targets, result: computeStandings({ estimator: 'random-effects-dl', targets, entries }) };
}

function Formula({ children }: { children: React.ReactNode }) {
  return <pre className="my-2 overflow-x-auto rounded bg-paper-sunk px-3 py-2 font-mono text-sm">{children}</pre>;
}

export function Component() {
  const { result } = example();
  const cons = result.targets[1];
  return (
    <div className="mx-auto max-w-3xl space-y-8">
      <PageHeader title="How scoring works">
        <p>
          The rules every standings table is computed under, version <strong className="num">{SCORING_RULES_VERSION}</strong>. Each standings row and each
          entry&apos;s scores record the rules version; when the rules change, every challenge is rescored and its history says so.
        </p>
      </PageHeader>

      <Panel title="1. Ranking keys are proper scores" id="proper">
        <p>
          A score is proper when a forecaster does best, on average, by stating what it believes: neither overconfident nor inflated error bars pay
          (Gneiting and Raftery 2007). Parallax ranks on two such scores, both in the units of the observable, lower is better.
        </p>
        <p className="mt-3 font-medium">Against an exact reference r (observable bound B, the sum of |coefficients|):</p>
        <Formula>{'score = CRPS of N(x, u²) censored to [−B, B] at r\n      = ∫_{−B}^{B} (Φ((z − x)/u) − 1{r ≤ z})² dz\n      = CRPS(N(x, u²), r) − u·G((−B − x)/u) − u·G((x − B)/u),\nG(a) = a Φ(a)² + 2 Φ(a) φ(a) − Φ(a√2)/√π\nu = 0: |x − r|'}</Formula>
        <p>Inside the range it is the usual CRPS, u[z(2Φ(z) − 1) + 2φ(z) − 1/√π] with z = (r − x)/u; no answer can score more than 2B.</p>
        <p className="mt-3 font-medium">Against the consensus N(c, u_c²), where no exact value exists:</p>
        <Formula>{'score = E over Y ~ N(c, u_c²) of CRPS(N(x, u²), Y)\n      = A(x − c, √(u² + u_c²)) − u/√π,   A(μ, σ) = μ(2Φ(μ/σ) − 1) + 2σφ(μ/σ)\n(capped at 2B)'}</Formula>
        <p>
          It includes the consensus uncertainty: a confident miss is not excused by a wide consensus, and a claimed u wider than the spread of the results
          costs. The degree of equivalence |d|/U, RMSE, max error, mean z² and coverage are shown beside the scores, never used to rank: a larger U
          always lowers |d|/U, and RMSE ignores the stated uncertainty.
        </p>
      </Panel>

      <Panel title="2. Like with like: coverage" id="coverage">
        <p>
          The ranked targets are every target with an exact reference and every target with a consensus (section 4); targets a moderator marked disputed
          are not ranked. Every entry is scored on all of them: a ranked target it did not answer scores <strong>2B</strong>, the worst score any answer
          can get. So an entry that answers a subset can never outrank one that answers everything and is at least as good on the shared targets. Equal
          scores go to the entry that answered more ranked targets, then to the earlier submission. The table shows, beside each score, how many ranked
          targets the entry answered.
        </p>
      </Panel>

      <Panel title="3. Exact answers" id="exact">
        <p>
          Floating-point results agree only to rounding. An estimate with u = 0 counts as exact and covered when <span className="num">|x − r| ≤ {EXACT_TOLERANCE} × B</span>;
          two u = 0 estimates agree when they differ by no more than that. In practice every uncertainty below half the tolerance is raised to it for z,
          coverage, |d|/U and the consensus; the score itself uses the stated u (|x − r| when u = 0).
        </p>
      </Panel>

      <Panel title="4. One result per team; no consensus from one team" id="independence">
        <p>
          The consensus of a target counts each team once (metrology practice: one result per laboratory): the team&apos;s most recently submitted entry that
          answers the target, or for equal times the smaller entry id. A target answered by fewer than {MIN_INDEPENDENT_TEAMS} independent teams has no
          consensus and scores no agreement. Entries of different teams whose values are equal to {NEAR_COPY_RELATIVE} (relative) on more than{' '}
          {NEAR_COPY_FRACTION * 100}% of at least {NEAR_COPY_MIN_SHARED} shared targets are flagged for review. The estimator (random effects by default)
          is the moderator&apos;s choice per challenge and is named on the standings.
        </p>
      </Panel>

      <Panel title="5. The house baseline is a reference row" id="baseline">
        <p>
          The built-in truncated Pauli propagation is shown in every table, labelled, for comparison. It is never ranked and never part of the consensus.
          Its uncertainty is a truncation bound (the sum of the dropped |coefficients|), shown as a bound capped at B, not used as a standard uncertainty:
          its scores are computed as for u = 0.
        </p>
      </Panel>

      <Panel title="6. Uncertainty of rank" id="ranks">
        <p>
          Each rank comes with a 95% interval from a bootstrap over the ranked targets: {BOOTSTRAP_REPLICATES} resamples (fewer on very large challenges)
          with the fixed seed {BOOTSTRAP_SEED}, so the intervals are reproducible. Two entries whose intervals overlap are not clearly ordered by the
          targets of this challenge.
        </p>
      </Panel>

      <Panel title="Worked example" id="example">
        <p>
          Two targets with B = 1: A has the exact value 0.500, B has none. Four teams (invented numbers). The consensus of B from the three teams that
          answered it (random effects): <span className="num">c = {formatSig(cons.value, 4)}, u_c = {formatSig(cons.uncertainty, 3)}</span>.
        </p>
        <div className="mt-3 overflow-x-auto">
          <table className="w-full border-collapse text-sm" data-testid="scoring-example">
            <thead>
              <tr className="text-left text-xs text-ink-soft">
                <th className="border-b border-rule-strong py-1 pr-2">Rank</th>
                <th className="border-b border-rule-strong py-1 pr-2">Entry</th>
                <th className="border-b border-rule-strong py-1 pr-2 text-right">Score on A</th>
                <th className="border-b border-rule-strong py-1 pr-2 text-right">Score on B</th>
                <th className="border-b border-rule-strong py-1 pr-2 text-right">Mean</th>
                <th className="border-b border-rule-strong py-1 text-right">Answered</th>
              </tr>
            </thead>
            <tbody>
              {result.entries.map((e) => {
                const a = e.metrics.scoreVerifiable;
                const b = e.metrics.scoreAgreement;
                return (
                  <tr key={e.id}>
                    <td className="num border-b border-rule py-1 pr-2">{e.rank}</td>
                    <td className="border-b border-rule py-1 pr-2">{e.label}</td>
                    <td className="num border-b border-rule py-1 pr-2 text-right">{formatSig(a, 3)}</td>
                    <td className="num border-b border-rule py-1 pr-2 text-right">{formatSig(b, 3)}{e.coverage.agreement.answered === 0 ? ' (missing: 2B)' : ''}</td>
                    <td className="num border-b border-rule py-1 pr-2 text-right">{formatSig(e.metrics.scoreOverall, 3)}</td>
                    <td className="num border-b border-rule py-1 text-right">{e.coverage.overall.answered}/{e.coverage.overall.ranked}</td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
        <p className="mt-3">
          Team P on A: z = (0.500 − 0.52)/0.02 = −1, CRPS = 0.02 × [1·(2Φ(1) − 1) + 2φ(1) − 1/√π] = 0.02 × 0.6024 = 0.01205. Team W has the same values
          with u = 0.5: its CRPS on A is larger, so inflating the error bar does not pay. Team X is exact on A (off by 1e-16, inside the tolerance, so
          covered) but did not answer B, which then scores 2B = 2: it ranks below every entry that answered both.
        </p>
      </Panel>

      <p className="text-sm text-ink-soft">
        Check values of every formula (published sources named beside each) are in the test suite. Back to <Link to="/challenges">the challenges</Link>.
      </p>
    </div>
  );
}
