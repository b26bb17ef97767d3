/**
 * The benchmark's HTTP side: one keep-alive connection per simulated client (a browser tab does
 * not pipeline), per-request timing from the first byte written to the last byte read, and
 * percentiles computed from every request's own time.
 */
import http from 'node:http';

export interface Reply {
  status: number;
  body: string;
  headers: http.IncomingHttpHeaders;
  ms: number;
}

export interface BenchClient {
  label: string;
  role: 'gc_manager' | 'inspector' | 'subcontractor';
  userId: string;
  companyId: string;
  cookie: string;
  csrf: string;
  agent: http.Agent;
}

export function newAgent(): http.Agent {
  return new http.Agent({ keepAlive: true, maxSockets: 1 });
}

export function send(
  base: URL,
  agent: http.Agent,
  method: string,
  path: string,
  headers: Record<string, string> = {},
  body?: string | Buffer,
): Promise<Reply> {
  return new Promise((resolve, reject) => {
    const started = process.hrtime.bigint();
    const req = http.request(
      {
        host: base.hostname,
        port: base.port,
        method,
        path,
        agent,
        headers: { accept: 'application/json', ...(body !== undefined ? { 'content-length': String(Buffer.byteLength(body)) } : {}), ...headers },
      },
      (res) => {
        const chunks: Buffer[] = [];
        res.on('data', (c: Buffer) => chunks.push(c));
        res.on('end', () =>
          resolve({
            status: res.statusCode ?? 0,
            body: Buffer.concat(chunks).toString('utf8'),
            headers: res.headers,
            ms: Number(process.hrtime.bigint() - started) / 1e6,
          }),
        );
        res.on('error', reject);
      },
    );
    req.on('error', reject);
    req.setTimeout(30_000, () => req.destroy(new Error('timeout after 30 s')));
    if (body !== undefined) req.write(body);
    req.end();
  });
}

export function percentile(sorted: number[], p: number): number {
  if (sorted.length === 0) return NaN;
  const i = Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1));
  return sorted[i]!;
}

export interface Stats {
  count: number;
  p50: number;
  p95: number;
  p99: number;
  max: number;
}

export function stats(times: number[]): Stats {
  const sorted = [...times].sort((a, b) => a - b);
  return { count: sorted.length, p50: percentile(sorted, 50), p95: percentile(sorted, 95), p99: percentile(sorted, 99), max: sorted[sorted.length - 1] ?? NaN };
}

/** multipart/form-data with a JSON `data` field and files; returns the body and its content type. */
export function multipart(data: unknown, files: { field: string; name: string; type: string; bytes: Buffer }[]): { body: Buffer; contentType: string } {
  const boundary = `----trimoutbench${Math.random().toString(16).slice(2)}`;
  const parts: Buffer[] = [];
  parts.push(Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="data"\r\n\r\n${JSON.stringify(data)}\r\n`));
  for (const f of files) {
    parts.push(Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="${f.field}"; filename="${f.name}"\r\nContent-Type: ${f.type}\r\n\r\n`));
    parts.push(f.bytes);
    parts.push(Buffer.from('\r\n'));
  }
  parts.push(Buffer.from(`--${boundary}--\r\n`));
  return { body: Buffer.concat(parts), contentType: `multipart/form-data; boundary=${boundary}` };
}

/** One cookie header value from a response's Set-Cookie lines (name=value only). */
export function cookieFrom(headers: http.IncomingHttpHeaders): string {
  const set = headers['set-cookie'] ?? [];
  return set.map((c) => c.split(';')[0]!).join('; ');
}
