/**
 * In-process cache of serialised standings responses, keyed by version and query. Invalidated
 * when this process recomputes; entries also expire after a short time so that several processes
 * on one PostgreSQL server converge within `ttlMs`.
 */
export class StandingsCache {
  private map = new Map<string, { at: number; body: string; etag: string }>();
  constructor(private ttlMs = 2000, private max = 500) {}
  get(key: string): { body: string; etag: string } | undefined {
    const hit = this.map.get(key);
    if (!hit) return undefined;
    if (Date.now() - hit.at > this.ttlMs) { this.map.delete(key); return undefined; }
    return hit;
  }
  set(key: string, body: string, etag: string): void {
    if (this.map.size >= this.max) this.map.clear();
    this.map.set(key, { at: Date.now(), body, etag });
  }
  invalidate(versionId: string): void {
    for (const k of this.map.keys()) if (k.startsWith(`${versionId}|`)) this.map.delete(k);
  }
  clear(): void { this.map.clear(); }
}

export const standingsCache = new StandingsCache();
