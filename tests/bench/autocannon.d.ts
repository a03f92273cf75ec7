/** The small part of autocannon's API the benchmarks use (the package ships no types). */
declare module 'autocannon' {
  import type { EventEmitter } from 'node:events';

  type Options = {
    url: string;
    connections?: number;
    duration?: number;
    headers?: Record<string, string>;
  };
  type Histogram = { average: number; mean: number; p50: number; p90: number; p97_5: number; p99: number; max: number };
  type Result = { latency: Histogram; requests: Histogram & { total: number }; non2xx: number; errors: number; timeouts: number; duration: number };
  type Instance = EventEmitter & Promise<Result>;

  function autocannon(options: Options): Instance;
  export default autocannon;
}
