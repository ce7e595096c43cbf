import { useId, useMemo, useState } from 'react';

export interface LatticeGeometry { kind: string; qubits: number; edges: readonly (readonly [number, number])[]; coords: readonly (readonly [number, number])[] }

/** chains longer than this are wrapped into serpentine rows (neighbours stay neighbours) */
const CHAIN_ROW = 20;

/**
 * The one drawing of a coupling graph (challenge pages and the moderators' preview), from the
 * coordinates and edges the server computes (shared/physics/lattices.ts). A chain of more than 20
 * qubits is wrapped into serpentine rows so that 60+ sites stay legible; every other lattice keeps its
 * true layout. Qubits inside `cone` are filled; the observable's own `support` is ringed. The qubit
 * numbers can be shown (a toggle below the drawing, or `indices` fixed by the caller).
 */
export function LatticeDrawing({ lattice, cone = null, support = new Set<number>(), title, indices, className }: {
  lattice: LatticeGeometry; cone?: Set<number> | null; support?: Set<number>; title: string; indices?: boolean; className?: string;
}) {
  const { coords, edges } = lattice;
  const [showOwn, setShowOwn] = useState(false);
  const show = indices ?? showOwn;
  const toggleId = useId();
  const n = coords.length;
  const box = useMemo(() => {
    if (!n) return { minX: 0, minY: 0, w: 1, h: 1 };
    const xs = coords.map((c) => c[0]), ys = coords.map((c) => c[1]);
    const minX = Math.min(...xs), maxX = Math.max(...xs), minY = Math.min(...ys), maxY = Math.max(...ys);
    return { minX, minY, w: Math.max(maxX - minX, 1e-9), h: Math.max(maxY - minY, 1e-9) };
  }, [coords, n]);
  if (!n) return null;
  const flat = box.h < 1e-6;
  const wrap = flat && n > CHAIN_ROW;
  const perRow = wrap ? CHAIN_ROW : n;
  const pad = 16;
  // the nearest-neighbour distance sets the scale: one unit of the layout is `unit` pixels
  const unit = flat ? 28 : Math.max(12, Math.min(40, 640 / Math.max(box.w, box.h)));
  const pos = (i: number): [number, number] => {
    const [x, y] = coords[i];
    if (flat) {
      const r = Math.floor(i / perRow), k = i % perRow;
      const kk = r % 2 === 0 ? k : perRow - 1 - k;
      return [pad + kk * unit, pad + r * unit * 1.6];
    }
    return [pad + (x - box.minX) * unit, pad + (y - box.minY) * unit];
  };
  const rows = Math.ceil(n / perRow);
  const W = flat ? pad * 2 + (Math.min(n, perRow) - 1) * unit : pad * 2 + box.w * unit;
  const H = flat ? pad * 2 + (rows - 1) * unit * 1.6 : pad * 2 + box.h * unit;
  const r = show ? Math.max(6, Math.min(11, unit * 0.34)) : Math.max(3, Math.min(7, unit * 0.28));
  const inCone = cone?.size ?? 0;
  const font = Math.max(5, r * (n > 99 ? 0.8 : 0.95));
  return (
    <figure className={className}>
      <svg viewBox={`0 0 ${W} ${H}`} className="h-auto max-h-[30rem] w-full" role="img" data-testid="lattice-drawing"
        aria-label={`${title}: ${n} qubits, ${edges.length} couplings${cone ? `, ${inCone} qubits in the light cone` : ''}${show ? ', qubit numbers shown' : ''}`}>
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
              {support.has(i) && <circle cx={x} cy={y} r={r + 3} fill="none" strokeWidth={1.6} className="stroke-ink" />}
              <circle cx={x} cy={y} r={r} strokeWidth={1.2} className={on ? 'fill-classical stroke-classical-ink' : 'fill-paper-raised stroke-ink-faint'}>
                <title>{`qubit ${i}${on ? ', in the light cone' : ''}${support.has(i) ? ', measured' : ''}`}</title>
              </circle>
              {show && <text x={x} y={y} dy="0.35em" textAnchor="middle" fontSize={font} className={on ? 'num fill-white' : 'num fill-ink'} aria-hidden="true">{i}</text>}
            </g>
          );
        })}
      </svg>
      <figcaption className="mt-2 flex flex-wrap items-center gap-x-4 gap-y-1 text-xs text-ink-soft">
        {cone && <span className="inline-flex items-center gap-1"><svg width="10" height="10" aria-hidden="true"><circle cx="5" cy="5" r="4" className="fill-classical" /></svg>in the light cone ({inCone} of {n})</span>}
        {cone && <span className="inline-flex items-center gap-1"><svg width="10" height="10" aria-hidden="true"><circle cx="5" cy="5" r="4" strokeWidth="1.2" className="fill-paper-raised stroke-ink-faint" /></svg>outside</span>}
        {support.size > 0 && <span className="inline-flex items-center gap-1"><svg width="12" height="12" aria-hidden="true"><circle cx="6" cy="6" r="5" fill="none" strokeWidth="1.5" className="stroke-ink" /></svg>measured by the observable</span>}
        {wrap && <span>the chain is drawn in serpentine rows of {CHAIN_ROW}</span>}
        {indices === undefined && (
          <label htmlFor={toggleId} className="ml-auto inline-flex cursor-pointer items-center gap-1.5 text-ink print:hidden">
            <input id={toggleId} type="checkbox" checked={showOwn} onChange={(e) => setShowOwn(e.target.checked)} />
            Show qubit numbers
          </label>
        )}
      </figcaption>
    </figure>
  );
}
