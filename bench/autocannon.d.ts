// The part of autocannon's API the HTTP benchmark uses (the package ships no types).
declare module 'autocannon' {
  interface Options {
    url: string;
    method?: string;
    headers?: Record<string, string>;
    body?: string;
    connections?: number;
    duration?: number;
    /** Per-request timeout, s. */
    timeout?: number;
  }
  interface Histogram {
    average: number;
    p50: number;
    p99: number;
    max: number;
  }
  interface Result {
    requests: Histogram & { total: number };
    latency: Histogram;
    non2xx: number;
    errors: number;
    timeouts: number;
    /** Answers by status code, e.g. {"200": {count: 812}, "503": {count: 3}}. */
    statusCodeStats?: Record<string, { count: number }>;
  }
  export default function autocannon(options: Options): Promise<Result>;
}
