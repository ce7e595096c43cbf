/** A lattice drawn from the coordinates and edges the server computes (buildLattice). */
export function LatticeSvg({ coords, edges, className }: { coords: [number, number][]; edges: [number, number][]; className?: string }) {
  if (!coords.length) return null;
  const xs = coords.map((c) => c[0]), ys = coords.map((c) => c[1]);
  const minX = Math.min(...xs), maxX = Math.max(...xs), minY = Math.min(...ys), maxY = Math.max(...ys);
  // a chain is drawn as a line; wrap long chains would mislead, so keep the true layout and pad it
  const w = Math.max(maxX - minX, 1), h = Math.max(maxY - minY, 0);
  const pad = 0.5;
  const r = 0.2;
  const label = coords.length <= 40;
  return (
    <svg
      viewBox={`${minX - pad} ${minY - pad} ${w + 2 * pad} ${h + 2 * pad}`}
      className={className}
      role="img"
      aria-label={`Lattice: ${coords.length} qubits, ${edges.length} couplings`}
      preserveAspectRatio="xMidYMid meet"
      data-testid="lattice-svg"
    >
      {edges.map(([a, b], i) => (
        <line key={i} x1={coords[a][0]} y1={coords[a][1]} x2={coords[b][0]} y2={coords[b][1]} stroke="currentColor" strokeOpacity="0.5" strokeWidth={0.05} />
      ))}
      {coords.map(([x, y], i) => (
        <g key={i}>
          <circle cx={x} cy={y} r={r} className="fill-paper-raised" stroke="currentColor" strokeWidth={0.04} />
          {label && <text x={x} y={y} dy="0.35em" textAnchor="middle" fontSize={r * 0.95} fill="currentColor" className="num">{i}</text>}
        </g>
      ))}
    </svg>
  );
}
