/**
 * Load generation with autocannon on loopback. Two shapes:
 * - closed loop: `connections` connections, each sends its next request as soon as the answer arrives;
 * - fixed arrival rate: `rate` requests per second in total over `connections` connections. autocannon's own
 *   `overallRate` releases each connection's quota for the second at once (back to back, then idle until the
 *   next second), so 300 req/s over 10 connections arrives as a burst at concurrency 10. By default the
 *   requests are instead paced: connection i sends at t0 + i·(1/rate) + k·(connections/rate), so arrivals are
 *   evenly spaced at 1/rate. `shape: 'autocannon-burst'` gives autocannon's plain overallRate behaviour.
 * Latency is taken per response from autocannon's 'response' event (hrtime, ms with decimals), 2xx only.
 */
import autocannon from 'autocannon';

export interface LoadOptions {
  url: string;
  body: string;
  connections: number;
  durationSec: number;
  /** Total requests per second; absent = closed loop. */
  rate?: number;
  shape?: 'paced' | 'autocannon-burst';
  /** A fresh Authorization header value for each request (e.g. a newly signed JWT). */
  authorization?: () => string;
}

export interface LoadResult {
  label?: string;
  rps: number;
  p50: number;
  p90: number;
  p99: number;
  max: number;
  ok: number;
  non2xx: number;
  errors: number;
  timeouts: number;
  /** Paced shape: requests sent more than 1 ms after their due time (the service could not keep up). */
  late: number;
  seconds: number;
}

function quantile(sorted: Float64Array, q: number): number {
  if (sorted.length === 0) return Number.NaN;
  const i = Math.min(sorted.length - 1, Math.max(0, Math.ceil(q * sorted.length) - 1));
  return sorted[i] ?? Number.NaN;
}

interface PacedClient {
  destroyed?: boolean;
  _doRequest: (...args: unknown[]) => void;
}

export async function runLoad(o: LoadOptions): Promise<LoadResult> {
  const latencies: number[] = [];
  let late = 0;
  const paced = o.rate !== undefined && (o.shape ?? 'paced') === 'paced';
  const rate = o.rate ?? 0;
  let clientIndex = 0;
  const t0 = performance.now() + 50;
  const period = paced ? (o.connections * 1000) / rate : 0;
  const opts: autocannon.Options = {
    url: o.url,
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: o.body,
    ...(o.authorization
      ? {
          requests: [
            {
              method: 'POST' as const,
              setupRequest: (req: autocannon.Request) => ({ ...req, headers: { ...req.headers, authorization: o.authorization!() } }),
            },
          ],
        }
      : {}),
    connections: o.connections,
    duration: o.durationSec,
    timeout: 10,
    ...(o.rate !== undefined && !paced ? { overallRate: rate, ignoreCoordinatedOmission: true } : {}),
    ...(paced
      ? {
          setupClient: (client: autocannon.Client) => {
            // Pace this connection: its k-th request is due at t0 + i/rate + k·period (autocannon internals, 9.0.0).
            const c = client as unknown as PacedClient;
            const send = c._doRequest.bind(c);
            let due = t0 + (clientIndex * 1000) / rate;
            clientIndex += 1;
            c._doRequest = (...args: unknown[]) => {
              const now = performance.now();
              const wait = due - now;
              if (wait < -1) {
                late += 1;
                due = now; // behind: send now, and do not try to catch up with a burst
              }
              due += period;
              if (wait > 0) setTimeout(() => (c.destroyed ? undefined : send(...args)), wait);
              else send(...args);
            };
          },
        }
      : {}),
  };
  const started = performance.now();
  const result = await new Promise<autocannon.Result>((resolve, reject) => {
    const instance = autocannon(opts, (err: unknown, res: autocannon.Result) => (err ? reject(err as Error) : resolve(res)));
    instance.on('response', (_client, statusCode, _bytes, responseTime) => {
      if (statusCode >= 200 && statusCode < 300) latencies.push(responseTime);
    });
  });
  const seconds = (performance.now() - started) / 1000;
  const sorted = Float64Array.from(latencies).sort();
  return {
    rps: latencies.length / seconds,
    p50: quantile(sorted, 0.5),
    p90: quantile(sorted, 0.9),
    p99: quantile(sorted, 0.99),
    max: sorted.length ? (sorted[sorted.length - 1] ?? Number.NaN) : Number.NaN,
    ok: latencies.length,
    non2xx: result.non2xx,
    errors: result.errors,
    timeouts: result.timeouts,
    late,
    seconds,
  };
}
