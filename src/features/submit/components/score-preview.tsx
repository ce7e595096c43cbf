import { Table, Td, Th } from '@/components/ui';
import { formatMeasurement, formatMetric, formatPercent, formatSig } from '@/lib/format';
import type { ValidateResult } from '../api/validate-entry';
import { StatGrid } from './stat-grid';

/** The dry run's score preview: the sweep against the public exact references, and the first targets. */
export function ScorePreview({ result }: { result: ValidateResult }) {
  const s = result.scores;
  const v = s.sweep.verifiable;
  const shown = s.targets.slice(0, 12);
  return (
    <div className="space-y-4" data-testid="score-preview">
      <p className="text-sm text-ink-soft">
        Against the {s.exactReferences} public exact references of {result.challenge.slug} v{result.challenge.version}. Sealed references are not used; the final scores may differ.
      </p>
      <StatGrid testId="preview" items={[
        ['Scored', `${v.scored}/${v.targets}`],
        ['RMSE', formatMetric(v.rmse)],
        ['Max |error|', formatMetric(v.maxAbsError)],
        ['Mean z²', formatMetric(v.meanZ2)],
        ['Within 2u', formatPercent(v.fractionCovered)],
        ['Coverage', formatPercent(result.coverage.fraction, 1)],
      ]} />
      {shown.length > 0 && (
        <Table>
          <thead>
            <tr><Th>Target</Th><Th num>Estimate</Th><Th num>Reference</Th><Th num>Error</Th><Th num>z</Th></tr>
          </thead>
          <tbody>
            {shown.map((t) => (
              <tr key={t.target}>
                <Td className="font-mono text-xs">{t.target}</Td>
                <Td num>{formatMeasurement(t.value, t.uncertainty).text}</Td>
                <Td num>{formatSig(t.reference, 6)}</Td>
                <Td num>{formatSig(t.error, 2)}</Td>
                <Td num className={t.covered ? undefined : 'text-danger'}>{formatSig(t.z, 2)}</Td>
              </tr>
            ))}
          </tbody>
        </Table>
      )}
      {s.targets.length > shown.length && <p className="text-xs text-ink-soft">The first {shown.length} of {s.targets.length} scored targets.</p>}
    </div>
  );
}
