/*
 * Reads a Chromium net log (--log-net-log, JSON: constants + events) for traffic that left the
 * machine. The event names are Chromium's own (net/log/net_log_event_type_list.h); what each one
 * carries was read off logs of this harness's runs:
 *
 * - TCP_CONNECT_ATTEMPT (begin) names the address a TCP socket connects to;
 * - UDP_CONNECT (begin) names a UDP socket's peer. connect() on a UDP socket sends nothing (it only
 *   picks a route, POSIX connect(2)), so such a socket counts only once it sends: UDP_BYTES_SENT or
 *   SOCKET_BYTES_SENT on the same source. Chromium's IPv6 reachability check
 *   (HOST_RESOLVER_MANAGER_IPV6_REACHABILITY_CHECK) is exactly such a route probe to a public
 *   address and sends no datagram;
 * - HOST_RESOLVER_DNS_TASK, HOST_RESOLVER_SYSTEM_TASK and DNS_TRANSACTION (begin) mean a name was
 *   really looked up (by Chromium's resolver or the system's), which asks a DNS server; the host is
 *   the DNS_TRANSACTION's own `hostname`, or the HOST_RESOLVER_MANAGER_JOB / _REQUEST begin event's
 *   `host` on the task's source; any of them for a name that is not loopback counts;
 * - URL_REQUEST_START_JOB (begin) names a request's URL; one for another host is fine only if it
 *   never got response headers (HTTP_TRANSACTION_READ_RESPONSE_HEADERS): the proxy fence in
 *   CHROMIUM_ARGS fails it on the loopback proxy. Such requests are listed as `fenced`.
 */

export interface NetLog {
  constants: { logEventTypes: Record<string, number> };
  events: { type: number; phase?: number; source: { id: number; type: number }; params?: Record<string, unknown> }[];
}

export interface NetLogFindings {
  /** Traffic that left (or would have left) the machine: each with the event that shows it. */
  offMachine: string[];
  /** Requests for other hosts that the proxy fence failed on loopback (none reached the network). */
  fenced: string[];
  /** Requests for loopback hosts (the test pages): evidence that the log was read at all. */
  loopbackRequests: number;
  /** Addresses that TCP sockets connected to. */
  tcpPeers: string[];
}

const PHASE_BEGIN = 1;

/** A loopback host or host:port: 127.0.0.0/8, ::1, localhost (RFC 6761 §6.3). */
export function isLoopback(hostOrAddress: string): boolean {
  let h = hostOrAddress.trim().toLowerCase();
  if (h.startsWith('[')) h = h.slice(1, h.indexOf(']'));
  else if (/^[^:]+:\d+$/.test(h)) h = h.slice(0, h.lastIndexOf(':'));
  return h === 'localhost' || h.endsWith('.localhost') || h === '::1' || /^127\.\d{1,3}\.\d{1,3}\.\d{1,3}$/.test(h);
}

function hostOfUrl(url: string): string | null {
  try {
    const u = new URL(url);
    return u.protocol === 'http:' || u.protocol === 'https:' || u.protocol === 'ws:' || u.protocol === 'wss:' ? u.hostname : null;
  } catch {
    return null;
  }
}

/** The host a resolver event names: a bare name, or "scheme://host[:port]" in recent builds. */
function resolverHost(h: string): string {
  return hostOfUrl(h) ?? h;
}

export function readNetLog(log: NetLog): NetLogFindings {
  const names = new Map<number, string>(Object.entries(log.constants.logEventTypes).map(([k, v]) => [v, k]));
  const findings: NetLogFindings = { offMachine: [], fenced: [], loopbackRequests: 0, tcpPeers: [] };
  const udpPeer = new Map<number, string>();
  const sent = new Set<number>();
  const requestUrl = new Map<number, string>();
  const answered = new Set<number>();
  const resolverHostOf = new Map<number, string>();
  const lookups: { source: number; event: string }[] = [];

  for (const e of log.events) {
    const name = names.get(e.type) ?? String(e.type);
    const p = e.params ?? {};
    const src = e.source.id;
    const begin = e.phase === PHASE_BEGIN;
    if (name === 'TCP_CONNECT_ATTEMPT' && begin && typeof p.address === 'string') {
      findings.tcpPeers.push(p.address);
      if (!isLoopback(p.address)) findings.offMachine.push(`TCP_CONNECT_ATTEMPT to ${p.address}`);
    } else if (name === 'UDP_CONNECT' && typeof p.address === 'string') {
      udpPeer.set(src, p.address);
    } else if (name === 'UDP_BYTES_SENT' || name === 'SOCKET_BYTES_SENT') {
      sent.add(src);
    } else if (name === 'URL_REQUEST_START_JOB' && begin && typeof p.url === 'string') {
      requestUrl.set(src, p.url);
    } else if (name === 'HTTP_TRANSACTION_READ_RESPONSE_HEADERS') {
      answered.add(src);
    } else if ((name === 'HOST_RESOLVER_MANAGER_JOB' || name === 'HOST_RESOLVER_MANAGER_REQUEST') && begin && typeof p.host === 'string') {
      resolverHostOf.set(src, resolverHost(p.host));
    } else if (name === 'DNS_TRANSACTION' && begin) {
      // a transaction is its own source and names its host; its parent logs a begin-less link to it
      if (typeof p.hostname === 'string') resolverHostOf.set(src, p.hostname);
      lookups.push({ source: src, event: name });
    } else if ((name === 'HOST_RESOLVER_DNS_TASK' || name === 'HOST_RESOLVER_SYSTEM_TASK') && begin) {
      lookups.push({ source: src, event: name });
    }
  }

  for (const [src, peer] of udpPeer) if (!isLoopback(peer) && sent.has(src)) findings.offMachine.push(`UDP datagrams to ${peer}`);
  for (const { source, event } of lookups) {
    const host = resolverHostOf.get(source);
    // a lookup whose name this log does not tie to a source still asked a server: count it
    if (host === undefined || !isLoopback(host)) findings.offMachine.push(`${event} for ${host ?? '(unnamed)'}`);
  }
  for (const [src, url] of requestUrl) {
    const host = hostOfUrl(url);
    if (host === null) continue;
    if (isLoopback(host)) findings.loopbackRequests++;
    else if (answered.has(src)) findings.offMachine.push(`URL_REQUEST answered by ${host}`);
    else findings.fenced.push(host);
  }
  findings.offMachine = [...new Set(findings.offMachine)];
  return findings;
}
