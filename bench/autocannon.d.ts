// autocannon ships no type declarations; the benchmarks use this much of it.
declare module 'autocannon' {
  interface Result { requests: { average: number }; latency: { p50: number; p99: number; average: number }; errors: number; non2xx: number; timeouts: number; statusCodeStats?: Record<string, { count: number }> }
  function autocannon(opts: Record<string, unknown>): Promise<Result>;
  export default autocannon;
}
