// The part of autocannon's programmatic interface the benchmarks use (the package ships no types).
declare module 'autocannon' {
  interface Options {
    url: string;
    connections?: number;
    duration?: number;
    headers?: Record<string, string>;
  }
  interface Histogram {
    average: number;
    mean: number;
    p50: number;
    p90: number;
    p99: number;
    max: number;
  }
  interface Result {
    requests: Histogram & { total: number };
    latency: Histogram;
    throughput: Histogram;
    errors: number;
    timeouts: number;
    non2xx: number;
    '2xx': number;
    duration: number;
  }
  function autocannon(options: Options): Promise<Result>;
  export default autocannon;
}
