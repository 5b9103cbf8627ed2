// The part of autocannon 8's API that scripts/bench-api.ts uses (the package ships no types).
declare module "autocannon" {
  type Histogram = { average: number; p50: number; p99: number };
  type Result = { requests: Histogram; latency: Histogram; non2xx: number; errors: number; timeouts: number };
  type Options = { url: string; connections?: number; duration?: number; headers?: Record<string, string> };
  function autocannon(opts: Options): Promise<Result>;
  export default autocannon;
}
