import { useMemo } from 'react';
import type { ChallengeDetail } from '@/features/challenges/api/get-challenge';

/**
 * The coupling graph drawn from lattice.coords and lattice.edges. Qubits inside the selected
 * target's light cone are filled; the observable's own support is ringed.
 */
export function LatticeDrawing({ lattice, cone, support, title }: { lattice: ChallengeDetail['lattice']; cone: Set<number> | null; support: Set<number>; title: string }) {
  const { coords, edges } = lattice;
  const box = useMemo(() => {
    const xs = coords.map((c) => c[0]), ys = coords.map((c) => c[1]);
    const minX = Math.min(...xs), maxX = Math.max(...xs), minY = Math.min(...ys), maxY = Math.max(...ys);
    return { minX, minY, w: Math.max(maxX - minX, 1e-9), h: Math.max(maxY - minY, 1e-9) };
  }, [coords]);
  const n = coords.length;
  // a chain is long and flat: wrap it into rows so that 60+ sites stay legible
  const flat = box.h < 1e-6;
  const perRow = flat ? Math.min(n, 20) : n;
  const pad = 14;
  const unit = flat ? 24 : Math.max(10, Math.min(34, 560 / Math.max(box.w, box.h)));
  const pos = (i: number): [number, number] => {
    const [x, y] = coords[i];
    if (flat) {
      const r = Math.floor(i / perRow), k = i % perRow;
      const kk = r % 2 === 0 ? k : perRow - 1 - k; // serpentine, neighbours stay neighbours
      return [pad + kk * unit, pad + r * unit * 1.6];
    }
    return [pad + (x - box.minX) * unit, pad + (y - box.minY) * unit];
  };
  const W = flat ? pad * 2 + (perRow - 1) * unit : pad * 2 + box.w * unit;
  const H = flat ? pad * 2 + (Math.ceil(n / perRow) - 1) * unit * 1.6 : pad * 2 + box.h * unit;
  const r = Math.max(3, Math.min(7, unit * 0.28));
  const inCone = cone?.size ?? 0;
  return (
    <figure>
      <svg viewBox={`0 0 ${W} ${H}`} className="h-auto max-h-[26rem] w-full" role="img" aria-label={`${title}: ${n} qubits, ${edges.length} couplings${cone ? `, ${inCone} qubits in the light cone` : ''}`}>
        {edges.map(([a, b], i) => {
          const [x1, y1] = pos(a), [x2, y2] = pos(b);
          const hot = cone ? cone.has(a) && cone.has(b) : false;
          return <line key={i} x1={x1} y1={y1} x2={x2} y2={y2} strokeWidth={hot ? 1.6 : 1} className={hot ? 'stroke-classical/70' : 'stroke-rule-strong'} />;
        })}
        {coords.map((_, i) => {
          const [x, y] = pos(i);
          const on = cone?.has(i);
          return (
            <g key={i}>
              {support.has(i) && <circle cx={x} cy={y} r={r + 3} fill="none" strokeWidth={1.5} className="stroke-ink" />}
              <circle cx={x} cy={y} r={r} strokeWidth={1.2} className={on ? 'fill-classical stroke-classical-ink' : 'fill-paper-raised stroke-ink-faint'}>
                <title>{`qubit ${i}${on ? ', in the light cone' : ''}${support.has(i) ? ', measured' : ''}`}</title>
              </circle>
            </g>
          );
        })}
      </svg>
      <figcaption className="mt-2 flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-soft">
        <span className="inline-flex items-center gap-1"><svg width="10" height="10" aria-hidden="true"><circle cx="5" cy="5" r="4" className="fill-classical" /></svg>in the light cone{cone ? ` (${inCone} of ${n})` : ''}</span>
        <span className="inline-flex items-center gap-1"><svg width="10" height="10" aria-hidden="true"><circle cx="5" cy="5" r="4" strokeWidth="1.2" className="fill-paper-raised stroke-ink-faint" /></svg>outside</span>
        <span className="inline-flex items-center gap-1"><svg width="12" height="12" aria-hidden="true"><circle cx="6" cy="6" r="5" fill="none" strokeWidth="1.5" className="stroke-ink" /></svg>measured by the observable</span>
        {flat && <span>the chain is drawn in serpentine rows</span>}
      </figcaption>
    </figure>
  );
}

/** the qubits an observable acts on, from its Pauli strings ("Z29", "Z3 Z4", "X0Y1") */
export function observableSupport(spec: { terms?: { pauli: string }[]; pauli?: string } | undefined): Set<number> {
  const out = new Set<number>();
  const strs = spec?.terms?.map((t) => t.pauli) ?? (spec?.pauli ? [spec.pauli] : []);
  for (const s of strs) for (const m of s.matchAll(/[XYZ]\s*(\d+)/g)) out.add(Number(m[1]));
  return out;
}

/**
 * A stand-in light cone when the server has none: the qubits within graph distance `steps` of
 * the support (each Trotter step's two-qubit layer spreads an operator by one bond).
 */
export function graphLightCone(n: number, edges: [number, number][], support: Set<number>, steps: number): Set<number> {
  const adj: number[][] = Array.from({ length: n }, () => []);
  for (const [a, b] of edges) { adj[a].push(b); adj[b].push(a); }
  const dist = new Map<number, number>();
  const queue = [...support];
  for (const s of support) dist.set(s, 0);
  while (queue.length) {
    const v = queue.shift()!;
    const d = dist.get(v)!;
    if (d >= steps) continue;
    for (const w of adj[v]) if (!dist.has(w)) { dist.set(w, d + 1); queue.push(w); }
  }
  return new Set(dist.keys());
}
