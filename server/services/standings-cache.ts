/**
 * In-process cache of serialised standings responses, keyed by challenge, caller class and query. Invalidated
 * when this process recomputes; entries also expire after a short time so that several processes
 * on one PostgreSQL server converge within `ttlMs`. One per app (AppContext.standingsCache), so two
 * apps in one process (the test suite makes many) never answer from each other's cache.
 */
export class StandingsCache {
  private map = new Map<string, { at: number; body: Buffer; etag: string; versionId: string }>();
  constructor(private ttlMs = 2000, private max = 500) {}
  get(key: string): { body: Buffer; etag: string } | undefined {
    const hit = this.map.get(key);
    if (!hit) return undefined;
    if (Date.now() - hit.at > this.ttlMs) { this.map.delete(key); return undefined; }
    return hit;
  }
  set(key: string, body: string, etag: string, versionId: string): void {
    if (this.map.size >= this.max) this.map.clear();
    // kept encoded: a hit then costs no string-to-bytes conversion
    this.map.set(key, { at: Date.now(), body: Buffer.from(body), etag, versionId });
  }
  /** Drops what was built from this version (a recomputation); with no argument, everything. */
  invalidate(versionId?: string): void {
    for (const [k, v] of this.map) if (!versionId || v.versionId === versionId) this.map.delete(k);
  }
  clear(): void { this.map.clear(); }
}
