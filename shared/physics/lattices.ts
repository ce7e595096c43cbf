/**
 * Coupling-graph generators (chain, ring, square grid, heavy-hex patch, explicit edge list) and
 * proper edge colourings. Plain data, no framework imports: shared by client, server and scripts.
 *
 * Qubits are 0-based. Every generator returns the qubit count, the edge list (each edge once, as
 * [a, b] with a < b) and 2-D coordinates for drawing (unit spacing, y grows downwards).
 */

export type Edge = readonly [number, number];

export interface Graph {
  n: number;
  edges: Edge[];
  /** coords[q] = [x, y] for drawing */
  coords: [number, number][];
}

export type LatticeSpec =
  | { kind: 'chain'; n: number }
  | { kind: 'ring'; n: number }
  | { kind: 'square'; rows: number; cols: number }
  | { kind: 'heavy-hex'; rows: number; cols: number }
  | { kind: 'edges'; n: number; edges: readonly (readonly number[])[] };

const norm = (a: number, b: number): Edge => (a < b ? [a, b] : [b, a]);

/** Open chain 0 - 1 - ... - (n-1): n - 1 edges. */
export function chain(n: number): Graph {
  const edges: Edge[] = [];
  for (let i = 0; i + 1 < n; i++) edges.push([i, i + 1]);
  const coords: [number, number][] = Array.from({ length: n }, (_, i) => [i, 0]);
  return { n, edges, coords };
}

/** Periodic ring: n edges for n >= 3 (n = 2 would repeat the edge, n = 1 has none). */
export function ring(n: number): Graph {
  if (n < 3) return chain(n);
  const edges: Edge[] = [];
  for (let i = 0; i + 1 < n; i++) edges.push([i, i + 1]);
  edges.push([0, n - 1]);
  const coords: [number, number][] = Array.from({ length: n }, (_, i) => {
    const a = (2 * Math.PI * i) / n;
    const r = n / (2 * Math.PI);
    return [r * Math.cos(a), r * Math.sin(a)];
  });
  return { n, edges, coords };
}

/** rows x cols open square grid, qubit r * cols + c: 2rc - r - c edges. */
export function square(rows: number, cols: number): Graph {
  const n = rows * cols;
  const edges: Edge[] = [];
  const coords: [number, number][] = [];
  for (let r = 0; r < rows; r++) {
    for (let c = 0; c < cols; c++) {
      const q = r * cols + c;
      coords.push([c, r]);
      if (c + 1 < cols) edges.push([q, q + 1]);
      if (r + 1 < rows) edges.push([q, q + cols]);
    }
  }
  return { n, edges, coords };
}

/**
 * Honeycomb patch of rows x cols hexagonal cells in brick-wall form: R + 1 horizontal lines of
 * vertices; cell (r, c) spans x = 2c + (r mod 2) .. 2c + 2 + (r mod 2) on lines r and r + 1, with
 * vertical edges at both ends. Line 0 and line R carry 2C + 1 vertices, interior lines 2C + 2.
 * Counts (derived in the test file): V = 2RC + 2R + 2C, E = 3RC + 2R + 2C - 1 (Euler: E = V + F - 1
 * with F = RC cells).
 */
export function honeycomb(rows: number, cols: number): Graph {
  if (rows < 1 || cols < 1) return { n: 0, edges: [], coords: [] };
  const off = (r: number) => r % 2;
  // x-range of line i
  const range = (i: number): [number, number] => {
    let lo = Infinity;
    let hi = -Infinity;
    for (const r of [i - 1, i]) {
      if (r < 0 || r >= rows) continue;
      lo = Math.min(lo, off(r));
      hi = Math.max(hi, 2 * cols + off(r));
    }
    return [lo, hi];
  };
  const index = new Map<string, number>();
  const coords: [number, number][] = [];
  for (let i = 0; i <= rows; i++) {
    const [lo, hi] = range(i);
    for (let x = lo; x <= hi; x++) {
      index.set(`${x},${i}`, coords.length);
      coords.push([x, i]);
    }
  }
  const id = (x: number, i: number) => index.get(`${x},${i}`) as number;
  const edges: Edge[] = [];
  for (let i = 0; i <= rows; i++) {
    const [lo, hi] = range(i);
    for (let x = lo; x < hi; x++) edges.push(norm(id(x, i), id(x + 1, i)));
  }
  for (let r = 0; r < rows; r++) {
    for (let k = 0; k <= cols; k++) {
      const x = 2 * k + off(r);
      edges.push(norm(id(x, r), id(x, r + 1)));
    }
  }
  return { n: coords.length, edges, coords };
}

/**
 * Heavy-hex patch: the rows x cols honeycomb patch with one extra qubit on every edge.
 * Vertex qubits keep their honeycomb indices 0..V-1; the qubit on honeycomb edge e is V + e and sits
 * at the edge midpoint. n = V + E = 5RC + 4R + 4C - 1 qubits, 2E = 6RC + 4R + 4C - 2 edges; degree
 * <= 3; bipartite (vertex qubits vs edge qubits).
 */
export function heavyHex(rows: number, cols: number): Graph {
  const h = honeycomb(rows, cols);
  const coords: [number, number][] = h.coords.map(([x, y]) => [x * 2, y * 2]);
  const edges: Edge[] = [];
  h.edges.forEach(([a, b], e) => {
    const m = h.n + e;
    coords.push([h.coords[a][0] + h.coords[b][0], h.coords[a][1] + h.coords[b][1]]);
    edges.push([a, m], [b, m]);
  });
  return { n: h.n + h.edges.length, edges, coords };
}

/** Explicit edge list (validated elsewhere: challenge.ts); coordinates on a circle. */
export function explicitEdges(n: number, list: readonly (readonly number[])[]): Graph {
  const edges = list.map(([a, b]) => norm(a, b));
  const r = Math.max(1, n / (2 * Math.PI));
  const coords: [number, number][] = Array.from({ length: n }, (_, i) => {
    const a = (2 * Math.PI * i) / Math.max(1, n);
    return [r * Math.cos(a), r * Math.sin(a)];
  });
  return { n, edges, coords };
}

/** Qubit count of a lattice without building it. */
export function latticeQubits(spec: LatticeSpec): number {
  switch (spec.kind) {
    case 'chain':
    case 'ring':
    case 'edges':
      return spec.n;
    case 'square':
      return spec.rows * spec.cols;
    case 'heavy-hex':
      return spec.rows < 1 || spec.cols < 1 ? 0 : 5 * spec.rows * spec.cols + 4 * spec.rows + 4 * spec.cols - 1;
  }
}

export function buildLattice(spec: LatticeSpec): Graph {
  switch (spec.kind) {
    case 'chain':
      return chain(spec.n);
    case 'ring':
      return ring(spec.n);
    case 'square':
      return square(spec.rows, spec.cols);
    case 'heavy-hex':
      return heavyHex(spec.rows, spec.cols);
    case 'edges':
      return explicitEdges(spec.n, spec.edges);
  }
}

export function maxDegree(n: number, edges: readonly Edge[]): number {
  const deg = new Int32Array(n);
  for (const [a, b] of edges) {
    deg[a]++;
    deg[b]++;
  }
  let m = 0;
  for (let i = 0; i < n; i++) m = Math.max(m, deg[i]);
  return m;
}

/** Two-colouring of the vertices, or null if the graph has an odd cycle. */
export function bipartition(n: number, edges: readonly Edge[]): Int8Array | null {
  const adj = adjacency(n, edges);
  const side = new Int8Array(n).fill(-1);
  const stack: number[] = [];
  for (let s = 0; s < n; s++) {
    if (side[s] !== -1) continue;
    side[s] = 0;
    stack.push(s);
    while (stack.length) {
      const u = stack.pop() as number;
      for (const v of adj[u]) {
        if (side[v] === -1) {
          side[v] = 1 - side[u];
          stack.push(v);
        } else if (side[v] === side[u]) return null;
      }
    }
  }
  return side;
}

export function adjacency(n: number, edges: readonly Edge[]): number[][] {
  const adj: number[][] = Array.from({ length: n }, () => []);
  for (const [a, b] of edges) {
    adj[a].push(b);
    adj[b].push(a);
  }
  return adj;
}

/**
 * Proper edge colouring, returned as colour layers (each a list of edges on disjoint qubits).
 * Bipartite graphs get exactly max-degree colours (Koenig's line-colouring theorem), by the
 * alternating-path construction: chain 2, heavy-hex 3, square grid 4, even ring 2. Other graphs
 * get a greedy colouring (at most 2 * maxDegree - 1 colours; an odd ring gets 3).
 * Edges keep their input order inside each layer.
 */
export function edgeColouring(n: number, edges: readonly Edge[]): Edge[][] {
  const colour = bipartition(n, edges) ? koenigColouring(n, edges) : greedyColouring(n, edges);
  const k = colour.reduce((m, c) => Math.max(m, c + 1), 0);
  const layers: Edge[][] = Array.from({ length: k }, () => []);
  edges.forEach((e, i) => layers[colour[i]].push(e));
  return layers;
}

function greedyColouring(n: number, edges: readonly Edge[]): number[] {
  const used: Set<number>[] = Array.from({ length: n }, () => new Set());
  return edges.map(([a, b]) => {
    let c = 0;
    while (used[a].has(c) || used[b].has(c)) c++;
    used[a].add(c);
    used[b].add(c);
    return c;
  });
}

function koenigColouring(n: number, edges: readonly Edge[]): number[] {
  const D = maxDegree(n, edges);
  // at[v * D + c] = index of the edge of colour c at v, or -1
  const at = new Int32Array(n * D).fill(-1);
  const colour = new Array<number>(edges.length).fill(-1);
  const free = (v: number) => {
    for (let c = 0; c < D; c++) if (at[v * D + c] === -1) return c;
    throw new Error('edge colouring: no free colour (degree miscount)');
  };
  const other = (e: number, v: number) => (edges[e][0] === v ? edges[e][1] : edges[e][0]);
  for (let e = 0; e < edges.length; e++) {
    const [u, v] = edges[e];
    const a = free(u);
    if (at[v * D + a] !== -1) {
      const b = free(v);
      // Flip the a/b alternating path starting at v (it cannot reach u: bipartite parity).
      const path: number[] = [];
      let x = v;
      let c = a;
      for (;;) {
        const f = at[x * D + c];
        if (f === -1) break;
        path.push(f);
        x = other(f, x);
        c = c === a ? b : a;
      }
      for (const f of path) {
        const [p, q] = edges[f];
        at[p * D + colour[f]] = -1;
        at[q * D + colour[f]] = -1;
      }
      for (const f of path) {
        const [p, q] = edges[f];
        colour[f] = colour[f] === a ? b : a;
        at[p * D + colour[f]] = f;
        at[q * D + colour[f]] = f;
      }
    }
    colour[e] = a;
    at[u * D + a] = e;
    at[v * D + a] = e;
  }
  return colour;
}

/** True if no two edges of a layer share a qubit and every edge appears exactly once. */
export function isProperColouring(edges: readonly Edge[], layers: readonly (readonly Edge[])[]): boolean {
  const key = (e: Edge) => `${Math.min(e[0], e[1])},${Math.max(e[0], e[1])}`;
  const want = new Map<string, number>();
  for (const e of edges) want.set(key(e), (want.get(key(e)) ?? 0) + 1);
  for (const layer of layers) {
    const seen = new Set<number>();
    for (const e of layer) {
      if (seen.has(e[0]) || seen.has(e[1])) return false;
      seen.add(e[0]);
      seen.add(e[1]);
      const k = key(e);
      const c = want.get(k);
      if (!c) return false;
      want.set(k, c - 1);
    }
  }
  for (const c of want.values()) if (c !== 0) return false;
  return true;
}

export interface NumberingRange {
  /** first and last qubit of the range, inclusive */
  from: number;
  to: number;
  /** what these qubits are, in words */
  what: string;
}

/**
 * How a lattice numbers its qubits, in words, range by range: the rule the generators above
 * follow, stated once for pages and documents (the test checks it against the coordinates).
 */
export function latticeNumbering(spec: LatticeSpec): NumberingRange[] {
  const n = latticeQubits(spec);
  if (n === 0) return [];
  switch (spec.kind) {
    case 'chain':
      return [{ from: 0, to: n - 1, what: 'along the chain; qubit i is coupled to i − 1 and i + 1 (open ends)' }];
    case 'ring':
      return [{ from: 0, to: n - 1, what: `around the ring; qubit i is coupled to i ± 1, and ${n - 1} to 0` }];
    case 'square':
      return [{ from: 0, to: n - 1, what: `row by row from the top, left to right: qubit r·${spec.cols} + c sits in row r, column c` }];
    case 'edges':
      return [{ from: 0, to: n - 1, what: 'as the edge list names them; drawn on a circle in index order' }];
    case 'heavy-hex': {
      const R = spec.rows, C = spec.cols;
      const V = 2 * R * C + 2 * R + 2 * C;
      const H = 4 * C + (R - 1) * (2 * C + 1);
      return [
        { from: 0, to: V - 1, what: `the hexagon corners (degree 2 or 3), line by line from the top and left to right in each line: ${2 * C + 1} on the first and last lines, ${2 * C + 2} on the ${R - 1} lines between` },
        { from: V, to: V + H - 1, what: 'one qubit on each horizontal bond between two corners, line by line from the top, left to right' },
        { from: V + H, to: n - 1, what: `the bridges: one qubit on each vertical bond, hexagon row by hexagon row from the top, left to right (${C + 1} per row)` },
      ];
    }
  }
}
