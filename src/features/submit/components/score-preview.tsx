import { Table, Td, Th } from '@/components/ui';
import { formatMeasurement, formatMetric, formatPercent, formatSig } from '@/lib/format';
import type { ValidateResult } from '../api/validate-entry';

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
      <Table>
        <thead>
          <tr><Th>Scored</Th><Th num>RMSE</Th><Th num>Max |error|</Th><Th num>Mean z²</Th><Th num>Within 2u</Th><Th num>Grid coverage</Th></tr>
        </thead>
        <tbody>
          <tr>
            <Td className="num">{v.scored} of {v.targets}</Td>
            <Td num data-testid="preview-rmse">{formatMetric(v.rmse)}</Td>
            <Td num>{formatMetric(v.maxAbsError)}</Td>
            <Td num title="near 1 means honest error bars">{formatMetric(v.meanZ2)}</Td>
            <Td num>{formatPercent(v.fractionCovered)}</Td>
            <Td num>{formatPercent(result.coverage.fraction, 1)}</Td>
          </tr>
        </tbody>
      </Table>
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
