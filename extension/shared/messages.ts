/**
 * The one typed contract for messages between background, overlay and popup. Each request names
 * its payload and its reply; `send` and the background's router are typed from this map, so a
 * message that one side renames fails to compile on the other.
 */
export interface RequestMap {
  /** Liveness and version, used by the popup's footer and by the browser tests. */
  'status/get': { payload: Record<string, never>; reply: { version: string; schema: number } };
}

export type RequestType = keyof RequestMap;

export interface Envelope<K extends RequestType = RequestType> {
  /** Marks our messages so that anything else on the runtime channel is ignored. */
  channel: 'clip-caliper';
  type: K;
  payload: RequestMap[K]['payload'];
}

/** Replies are wrapped so that an error crosses the channel as data, not as a lost promise. */
export type Reply<K extends RequestType> =
  | { ok: true; value: RequestMap[K]['reply'] }
  | { ok: false; error: string };

export function envelope<K extends RequestType>(type: K, payload: RequestMap[K]['payload']): Envelope<K> {
  return { channel: 'clip-caliper', type, payload };
}

export function isEnvelope(x: unknown): x is Envelope {
  return typeof x === 'object' && x !== null && (x as { channel?: unknown }).channel === 'clip-caliper';
}
