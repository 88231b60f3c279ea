// The few parts of autocannon's API the benchmarks use (the package ships no types).
declare module 'autocannon' {
  interface Options {
    url: string
    connections?: number
    duration?: number
    amount?: number
    headers?: Record<string, string>
  }
  interface Histogram {
    average: number
    p50: number
    p90: number
    p99: number
    max: number
  }
  interface Result {
    requests: Histogram & { total: number }
    latency: Histogram
    non2xx: number
    errors: number
    timeouts: number
  }
  function autocannon(o: Options): Promise<Result>
  export default autocannon
}
