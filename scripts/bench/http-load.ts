/**
 * Route timings for the benchmarks: one call alone (a cold call when it is the first since a start or a
 * load), and a fixed-duration run of autocannon with N connections, whose per-request times give p50/p95.
 */
import autocannon from "autocannon";
import { quantile } from "d3-array";

export interface RouteFigures {
  route: string;
  requests: number;
  errors: number;
  p50: number;
  p95: number;
}

/** One GET, timed, its status checked. */
export async function timedGet(origin: string, route: string, cookie: string): Promise<number> {
  const t0 = performance.now();
  const res = await fetch(origin + route, { headers: { Cookie: cookie, "Accept-Encoding": "br, gzip" } });
  await res.arrayBuffer();
  if (res.status !== 200) throw new Error(`${route} answered ${res.status}`);
  return performance.now() - t0;
}

/** `connections` concurrent clients on one route for `seconds`; latency quantiles from every response. */
export async function loadRoute(origin: string, route: string, cookie: string, connections: number, seconds: number): Promise<RouteFigures> {
  const times: number[] = [];
  let errors = 0;
  const result = await new Promise<autocannon.Result>((resolve, reject) => {
    const instance = autocannon(
      { url: origin + route, connections, duration: seconds, headers: { cookie, "accept-encoding": "br, gzip" }, timeout: 120 },
      (err, r) => (err ? reject(err) : resolve(r)),
    );
    instance.on("response", (_client, status, _bytes, ms) => {
      if (status !== 200) errors++;
      times.push(ms);
    });
  });
  times.sort((a, b) => a - b);
  return {
    route,
    requests: times.length,
    errors: errors + result.errors + result.timeouts,
    p50: quantile(times, 0.5) ?? NaN,
    p95: quantile(times, 0.95) ?? NaN,
  };
}
