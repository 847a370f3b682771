/** The part of autocannon 9's API the bench uses (the package ships no types). */
declare module 'autocannon' {
  interface Histogram {
    average: number;
    mean: number;
    stddev: number;
    min: number;
    max: number;
    total: number;
    p50: number;
    p90: number;
    p99: number;
  }
  interface Options {
    url: string;
    method?: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
    connections?: number;
    duration?: number;
    headers?: Record<string, string>;
    body?: string;
  }
  interface Result {
    latency: Histogram;
    requests: Histogram;
    throughput: Histogram;
    errors: number;
    timeouts: number;
    non2xx: number;
    statusCodeStats?: Record<string, { count: number }>;
    duration: number;
  }
  function autocannon(opts: Options): Promise<Result>;
  export default autocannon;
}
