import { isEnvelope, type Envelope, type Reply, type RequestMap, type RequestType } from '../shared/messages';

export type Handlers = { [K in RequestType]: (payload: RequestMap[K]['payload']) => Promise<RequestMap[K]['reply']> };

/**
 * Turns the handler table into a runtime.onMessage listener. Errors become `{ ok: false }` replies
 * so the sender sees the message instead of a closed port.
 */
export function routeMessages(handlers: Handlers) {
  return (message: unknown): Promise<Reply<RequestType>> | undefined => {
    if (!isEnvelope(message)) return undefined;
    const env = message as Envelope;
    const handler = handlers[env.type] as ((p: unknown) => Promise<unknown>) | undefined;
    if (!handler) return Promise.resolve({ ok: false, error: `unknown request ${String(env.type)}` });
    return handler(env.payload).then(
      (value) => ({ ok: true, value }) as Reply<RequestType>,
      (err: unknown) => ({ ok: false, error: err instanceof Error ? err.message : String(err) }),
    );
  };
}
