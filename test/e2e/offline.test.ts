import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { E2E_DIST, injectOverlay, launchWithExtension, overlayReady, sendAsPopup, videoReady } from './harness';
import { isLoopback, readNetLog, type NetLog } from './net-log';
import { startServer, type TestServer } from '../../extension/tools/static-server';

/*
 * The browser the tests drive makes no request off the machine (project rule: no network). The
 * check reads Chromium's own net log of a short flow: an extension page, a local page with a
 * video, the overlay called up and its case saved. The fence that makes this hold is in
 * harness.ts (CHROMIUM_ARGS).
 */

let server: TestServer;
let dir: string;
beforeAll(async () => {
  server = await startServer();
  dir = mkdtempSync(join(tmpdir(), 'clip-caliper-netlog-'));
});
afterAll(async () => {
  await server?.close();
  if (dir) rmSync(dir, { recursive: true, force: true });
});

/** A log in Chromium's format with the given events (type names; the numbers are made up here). */
function invented(events: { name: string; phase?: number; source: number; params?: Record<string, unknown> }[]): NetLog {
  const names = [...new Set(events.map((e) => e.name))];
  const logEventTypes = Object.fromEntries(names.map((n, i) => [n, 100 + i]));
  return { constants: { logEventTypes }, events: events.map((e) => ({ type: logEventTypes[e.name]!, phase: e.phase ?? 1, source: { id: e.source, type: 1 }, params: e.params })) };
}

describe('reading a net log (invented logs shaped like the ones this harness recorded)', () => {
  it('counts loopback as RFC 6761 and RFC 1122 define it, and nothing else', () => {
    for (const h of ['127.0.0.1:8080', '127.9.9.9', 'localhost', 'a.localhost', '[::1]:443']) expect(isLoopback(h), h).toBe(true);
    for (const h of ['10.255.255.53:53', '[2001:db8::1]:443', '128.0.0.1', 'localhost.example', '192.0.2.2']) expect(isLoopback(h), h).toBe(false);
  });

  it('finds a DNS query, a TCP connection and an answered request to another host', () => {
    const f = readNetLog(
      invented([
        { name: 'UDP_CONNECT', source: 1, params: { address: '192.0.2.53:53' } },
        { name: 'UDP_BYTES_SENT', phase: 0, source: 1, params: { byte_count: 40 } },
        { name: 'DNS_TRANSACTION', source: 2, params: { hostname: 'updates.example', query_type: 1 } },
        { name: 'TCP_CONNECT_ATTEMPT', source: 3, params: { address: '192.0.2.7:443' } },
        { name: 'URL_REQUEST_START_JOB', source: 4, params: { url: 'https://updates.example/check' } },
        { name: 'HTTP_TRANSACTION_READ_RESPONSE_HEADERS', phase: 0, source: 4 },
      ]),
    );
    expect(f.offMachine).toEqual(['TCP_CONNECT_ATTEMPT to 192.0.2.7:443', 'UDP datagrams to 192.0.2.53:53', 'DNS_TRANSACTION for updates.example', 'URL_REQUEST answered by updates.example']);
  });

  it('lets a route probe (UDP connect, nothing sent) and a request failed at the loopback proxy pass', () => {
    const f = readNetLog(
      invented([
        { name: 'UDP_CONNECT', source: 1, params: { address: '[2001:db8::8888]:443' } },
        { name: 'URL_REQUEST_START_JOB', source: 2, params: { url: 'https://accounts.example/list' } },
        { name: 'TCP_CONNECT_ATTEMPT', source: 3, params: { address: '127.0.0.1:9' } },
        { name: 'URL_REQUEST_START_JOB', source: 4, params: { url: 'http://127.0.0.1:4000/plain.html' } },
      ]),
    );
    expect(f.offMachine).toEqual([]);
    expect(f.fenced).toEqual(['accounts.example']);
    expect(f.loopbackRequests).toBe(1);
  });
});

describe('the browser under test', () => {
  it('sends nothing off the machine while an extension page, a local video page and the overlay run', async () => {
    const netLog = join(dir, 'net.json');
    const app = await launchWithExtension(E2E_DIST, { netLog });
    let pageUrl = '';
    try {
      // an extension page (the harness opens the popup's page for this) ...
      const status = (await sendAsPopup(app, 'status/get', {})) as { version: string };
      expect(status.version).toMatch(/^\d+\.\d+/);
      // ... and a local page with a video, measured: the case is saved through the background
      const page = await app.context.newPage();
      await page.goto(server.url('/plain.html'));
      pageUrl = page.url();
      await videoReady(page);
      await injectOverlay(app, pageUrl);
      await overlayReady(page, 0);
      // give the browser's own startup services the time they took to show up unfenced (< 4 s)
      await page.waitForTimeout(4000);
    } finally {
      await app.close(); // the net log is complete only once the browser has closed
    }
    const findings = readNetLog(JSON.parse(readFileSync(netLog, 'utf8')) as NetLog);
    // the log was read: it holds the test page's own requests and its server's address
    expect(findings.loopbackRequests).toBeGreaterThan(0);
    expect(findings.tcpPeers).toContain(`127.0.0.1:${server.port}`);
    expect(findings.offMachine).toEqual([]);
    expect(findings.tcpPeers.filter((a) => !isLoopback(a))).toEqual([]);
    // what the fence stopped, for the record (the browser's own update and account checks)
    console.info(`net log: ${findings.loopbackRequests} loopback requests; fenced at the loopback proxy: ${[...new Set(findings.fenced)].join(', ') || 'none'}`);
  });
});
