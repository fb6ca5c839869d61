import { createServer, type Server } from 'node:http';
import { readFile } from 'node:fs/promises';
import { extname, join, normalize, resolve } from 'node:path';

/*
 * A tiny static server on 127.0.0.1 for the demo launcher and the browser tests: pages from one
 * folder at /, the fixture clips at /clips/. It answers Range requests, because Chromium's media
 * stack seeks with them.
 */
const TYPES: Record<string, string> = { '.html': 'text/html; charset=utf-8', '.webm': 'video/webm', '.mp4': 'video/mp4', '.json': 'application/json', '.js': 'text/javascript' };

export interface TestServer {
  port: number;
  url(path: string, host?: '127.0.0.1' | 'localhost'): string;
  close(): Promise<void>;
}

export async function startServer(pagesDir = 'test/e2e/pages'): Promise<TestServer> {
  const pages = resolve(pagesDir);
  const clips = resolve('test/fixtures/clips');
  const server: Server = createServer(async (req, res) => {
    try {
      const path = decodeURIComponent(new URL(req.url ?? '/', 'http://x').pathname);
      const [base, rel] = path.startsWith('/clips/') ? [clips, path.slice(7)] : [pages, path.slice(1) || 'plain.html'];
      const file = normalize(join(base, rel));
      if (!file.startsWith(base)) throw new Error('outside');
      const body = await readFile(file);
      const type = TYPES[extname(file)] ?? 'application/octet-stream';
      // "bytes=a-b", "bytes=a-" and the suffix form "bytes=-n" (the last n bytes)
      const range = /^bytes=(\d*)-(\d*)$/.exec(req.headers.range ?? '');
      if (range && (range[1] || range[2])) {
        const start = range[1] ? Number(range[1]) : Math.max(0, body.length - Number(range[2]));
        const end = range[1] && range[2] ? Math.min(Number(range[2]), body.length - 1) : body.length - 1;
        res.writeHead(206, { 'content-type': type, 'accept-ranges': 'bytes', 'content-range': `bytes ${start}-${end}/${body.length}`, 'content-length': end - start + 1 });
        res.end(body.subarray(start, end + 1));
        return;
      }
      res.writeHead(200, { 'content-type': type, 'accept-ranges': 'bytes', 'content-length': body.length });
      res.end(body);
    } catch {
      res.writeHead(404).end('not found');
    }
  });
  await new Promise<void>((ok) => server.listen(0, '127.0.0.1', ok));
  const port = (server.address() as { port: number }).port;
  return {
    port,
    url: (path, host = '127.0.0.1') => `http://${host}:${port}${path}`,
    close: () => new Promise((ok) => server.close(() => ok())),
  };
}
