import { describe, expect, it } from 'vitest';
import {
  bipartition,
  buildLattice,
  chain,
  edgeColouring,
  explicitEdges,
  heavyHex,
  honeycomb,
  isProperColouring,
  latticeNumbering,
  latticeQubits,
  maxDegree,
  ring,
  square,
  type Edge,
} from '../../../shared/physics/lattices';

/** Every edge once, a < b, endpoints in range, no self-loops or repeats. */
function checkSimple(n: number, edges: readonly Edge[]) {
  const seen = new Set<string>();
  for (const [a, b] of edges) {
    expect(a).toBeLessThan(b);
    expect(a).toBeGreaterThanOrEqual(0);
    expect(b).toBeLessThan(n);
    const k = `${a},${b}`;
    expect(seen.has(k)).toBe(false);
    seen.add(k);
  }
}

function connected(n: number, edges: readonly Edge[]): boolean {
  const p = Array.from({ length: n }, (_, i) => i);
  const find = (x: number): number => (p[x] === x ? x : (p[x] = find(p[x])));
  for (const [a, b] of edges) p[find(a)] = find(b);
  return new Set(p.map(find)).size === 1;
}

describe('graph facts', () => {
  it('chain of n has n - 1 edges, degree 2 (path graph)', () => {
    for (const n of [1, 2, 5, 48]) {
      const g = chain(n);
      expect(g.n).toBe(n);
      expect(g.edges.length).toBe(n - 1);
      checkSimple(n, g.edges);
      expect(g.coords.length).toBe(n);
    }
    expect(maxDegree(48, chain(48).edges)).toBe(2);
  });

  it('ring of n >= 3 has n edges, every degree 2 (cycle graph)', () => {
    for (const n of [3, 4, 7, 48]) {
      const g = ring(n);
      expect(g.edges.length).toBe(n);
      checkSimple(n, g.edges);
      expect(maxDegree(n, g.edges)).toBe(2);
    }
  });

  it('square r x c grid has 2rc - r - c edges (r(c-1) horizontal + c(r-1) vertical)', () => {
    for (const [r, c] of [[1, 1], [1, 5], [3, 4], [10, 10]]) {
      const g = square(r, c);
      expect(g.n).toBe(r * c);
      expect(g.edges.length).toBe(2 * r * c - r - c);
      checkSimple(g.n, g.edges);
    }
    expect(maxDegree(100, square(10, 10).edges)).toBe(4);
  });

  it('honeycomb R x C brick patch: V = 2RC + 2R + 2C, E = 3RC + 2R + 2C - 1 (Euler E = V + F - 1, F = RC)', () => {
    // Derivation: R + 1 vertex lines; the two outer lines carry 2C + 1 vertices, the R - 1 inner
    // lines 2C + 2: V = 2(2C + 1) + (R - 1)(2C + 2) = 2RC + 2R + 2C. Hand counts: one hexagon 6/6,
    // two hexagons side by side 10/11.
    expect([honeycomb(1, 1).n, honeycomb(1, 1).edges.length]).toEqual([6, 6]);
    expect([honeycomb(1, 2).n, honeycomb(1, 2).edges.length]).toEqual([10, 11]);
    expect([honeycomb(2, 1).n, honeycomb(2, 1).edges.length]).toEqual([10, 11]);
    for (const [R, C] of [[1, 1], [2, 3], [3, 2], [4, 7], [7, 4]]) {
      const g = honeycomb(R, C);
      expect(g.n).toBe(2 * R * C + 2 * R + 2 * C);
      expect(g.edges.length).toBe(3 * R * C + 2 * R + 2 * C - 1);
      checkSimple(g.n, g.edges);
      expect(maxDegree(g.n, g.edges)).toBeLessThanOrEqual(3);
      expect(connected(g.n, g.edges)).toBe(true);
      // Number of hexagonal faces: every interior face of the brick wall is a 6-cycle, F = E - V + 1
      expect(g.edges.length - g.n + 1).toBe(R * C);
      // no vertex of degree 1 (no dangling qubits)
      const deg = new Array(g.n).fill(0);
      for (const [a, b] of g.edges) {
        deg[a]++;
        deg[b]++;
      }
      expect(Math.min(...deg)).toBe(2);
    }
  });

  it('heavy-hex R x C: n = V + E = 5RC + 4R + 4C - 1 qubits, 2E = 6RC + 4R + 4C - 2 edges', () => {
    // one cell: a 12-cycle (6 vertex qubits + 6 edge qubits)
    const one = heavyHex(1, 1);
    expect(one.n).toBe(12);
    expect(one.edges.length).toBe(12);
    expect(maxDegree(12, one.edges)).toBe(2);
    for (const [R, C] of [[1, 1], [2, 3], [3, 3], [5, 8], [12, 12]]) {
      const g = heavyHex(R, C);
      expect(g.n).toBe(5 * R * C + 4 * R + 4 * C - 1);
      expect(latticeQubits({ kind: 'heavy-hex', rows: R, cols: C })).toBe(g.n);
      expect(g.edges.length).toBe(6 * R * C + 4 * R + 4 * C - 2);
      checkSimple(g.n, g.edges);
      expect(maxDegree(g.n, g.edges)).toBe(R * C > 1 ? 3 : 2);
      expect(bipartition(g.n, g.edges)).not.toBeNull();
      expect(connected(g.n, g.edges)).toBe(true);
    }
  });

  it('heavy-hex edge qubits sit at the midpoint of their two neighbours and have degree 2', () => {
    const h = honeycomb(3, 4);
    const g = heavyHex(3, 4);
    const nbrs: number[][] = Array.from({ length: g.n }, () => []);
    for (const [a, b] of g.edges) {
      nbrs[a].push(b);
      nbrs[b].push(a);
    }
    for (let m = h.n; m < g.n; m++) {
      expect(nbrs[m].length).toBe(2);
      const [a, b] = nbrs[m];
      expect(a).toBeLessThan(h.n);
      expect(b).toBeLessThan(h.n);
      expect(g.coords[m][0]).toBeCloseTo((g.coords[a][0] + g.coords[b][0]) / 2, 12);
      expect(g.coords[m][1]).toBeCloseTo((g.coords[a][1] + g.coords[b][1]) / 2, 12);
    }
    // distinct coordinates for every qubit
    expect(new Set(g.coords.map((c) => c.join(','))).size).toBe(g.n);
  });

  it('odd rings are not bipartite, even rings are', () => {
    expect(bipartition(7, ring(7).edges)).toBeNull();
    expect(bipartition(8, ring(8).edges)).not.toBeNull();
  });

  it('buildLattice dispatches on kind; explicit edges are normalised', () => {
    expect(buildLattice({ kind: 'square', rows: 2, cols: 3 }).edges.length).toBe(7);
    const g = explicitEdges(4, [[3, 0], [1, 2]]);
    expect(g.edges).toEqual([[0, 3], [1, 2]]);
    expect(g.coords.length).toBe(4);
  });
});

describe('edge colouring', () => {
  // Koenig's line colouring theorem: a bipartite graph's edges can be coloured with maxDegree colours.
  it('uses exactly maxDegree colours on bipartite lattices (Koenig): chain 2, heavy-hex 3, square 4', () => {
    const cases: [string, { n: number; edges: Edge[] }, number][] = [
      ['chain 48', chain(48), 2],
      ['even ring 48', ring(48), 2],
      ['heavy-hex 1x1', heavyHex(1, 1), 2],
      ['heavy-hex 3x4', heavyHex(3, 4), 3],
      ['heavy-hex 12x12', heavyHex(12, 12), 3],
      ['square 7x9', square(7, 9), 4],
      ['square 1x6', square(1, 6), 2],
    ];
    for (const [name, g, k] of cases) {
      const layers = edgeColouring(g.n, g.edges);
      expect(layers.length, name).toBe(k);
      expect(isProperColouring(g.edges, layers), name).toBe(true);
    }
  });

  it('odd ring needs 3 colours (an odd cycle has chromatic index 3)', () => {
    const g = ring(9);
    const layers = edgeColouring(g.n, g.edges);
    expect(layers.length).toBe(3);
    expect(isProperColouring(g.edges, layers)).toBe(true);
  });

  it('random bipartite multigraph-free graphs get maxDegree colours', () => {
    let seed = 12345;
    const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    for (let trial = 0; trial < 30; trial++) {
      const left = 3 + Math.floor(rnd() * 10);
      const right = 3 + Math.floor(rnd() * 10);
      const set = new Set<string>();
      const edges: Edge[] = [];
      for (let k = 0; k < left * right * 0.4; k++) {
        const a = Math.floor(rnd() * left);
        const b = left + Math.floor(rnd() * right);
        if (!set.has(`${a},${b}`)) {
          set.add(`${a},${b}`);
          edges.push([a, b]);
        }
      }
      const n = left + right;
      const layers = edgeColouring(n, edges);
      expect(isProperColouring(edges, layers)).toBe(true);
      expect(layers.length).toBe(maxDegree(n, edges));
    }
  });

  it('greedy fallback is proper on a non-bipartite explicit graph (K4: chromatic index 3)', () => {
    const edges: Edge[] = [[0, 1], [0, 2], [0, 3], [1, 2], [1, 3], [2, 3]];
    const layers = edgeColouring(4, edges);
    expect(isProperColouring(edges, layers)).toBe(true);
    expect(layers.length).toBeGreaterThanOrEqual(3);
    expect(layers.length).toBeLessThanOrEqual(5); // greedy bound 2 * maxDegree - 1
  });

  it('isProperColouring rejects a clash and a missing edge', () => {
    expect(isProperColouring([[0, 1], [1, 2]], [[[0, 1], [1, 2]]])).toBe(false);
    expect(isProperColouring([[0, 1], [1, 2]], [[[0, 1]]])).toBe(false);
  });
});

describe('qubit numbering in words (latticeNumbering)', () => {
  it('heavy-hex: corners, then horizontal bonds, then bridges, as the coordinates place them', () => {
    for (const [rows, cols] of [[1, 1], [2, 3], [3, 2], [4, 4]] as const) {
      const g = heavyHex(rows, cols);
      const r = latticeNumbering({ kind: 'heavy-hex', rows, cols });
      expect(r).toHaveLength(3);
      expect(r[0].from).toBe(0);
      expect(r[2].to).toBe(g.n - 1);
      expect(r[1].from).toBe(r[0].to + 1);
      expect(r[2].from).toBe(r[1].to + 1);
      const deg = new Int32Array(g.n);
      for (const [a, b] of g.edges) { deg[a]++; deg[b]++; }
      // corners sit at even x and y (honeycomb vertices doubled) and have degree 2 or 3
      for (let q = r[0].from; q <= r[0].to; q++) {
        expect(g.coords[q][0] % 2 === 0 && g.coords[q][1] % 2 === 0).toBe(true);
        expect(deg[q]).toBeGreaterThanOrEqual(2);
      }
      // horizontal-bond qubits on even lines, bridges on odd lines; both have degree 2
      for (let q = r[1].from; q <= r[1].to; q++) { expect(g.coords[q][1] % 2).toBe(0); expect(deg[q]).toBe(2); }
      for (let q = r[2].from; q <= r[2].to; q++) { expect(Math.abs(g.coords[q][1] % 2)).toBe(1); expect(deg[q]).toBe(2); }
      // each range reads top to bottom, then left to right
      for (const x of r) {
        for (let q = x.from + 1; q <= x.to; q++) {
          const [x0, y0] = g.coords[q - 1], [x1, y1] = g.coords[q];
          expect(y1 > y0 || (y1 === y0 && x1 > x0)).toBe(true);
        }
      }
      expect(r[2].to - r[2].from + 1).toBe(rows * (cols + 1));
    }
  });

  it('square: row-major; chain and ring: one range over every qubit', () => {
    const g = square(3, 4);
    const r = latticeNumbering({ kind: 'square', rows: 3, cols: 4 });
    expect(r).toEqual([{ from: 0, to: 11, what: expect.stringContaining('r·4 + c') }]);
    expect(g.coords[6]).toEqual([2, 1]); // r = 1, c = 2: 1·4 + 2 = 6
    expect(latticeNumbering({ kind: 'chain', n: 5 })).toEqual([{ from: 0, to: 4, what: expect.any(String) }]);
    expect(latticeNumbering({ kind: 'ring', n: 6 })[0].what).toContain('5 to 0');
  });
});
