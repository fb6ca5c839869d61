import type { Runtime } from 'webextension-polyfill';
import { isEnvelope, type Envelope, type Reply, type RequestMap, type RequestType } from '../shared/messages';

/** Each handler gets the payload and who sent it (the overlay's tab and frame, for tab-bound work). */
export type Handlers = {
  [K in RequestType]: (payload: RequestMap[K]['payload'], sender: Runtime.MessageSender) => Promise<RequestMap[K]['reply']>;
};

/**
 * Turns the handler table into a runtime.onMessage listener. Errors become `{ ok: false }` replies
 * so the sender sees the message instead of a closed port.
 */
export function routeMessages(handlers: Handlers) {
  return (message: unknown, sender: Runtime.MessageSender): Promise<Reply<RequestType>> | undefined => {
    if (!isEnvelope(message)) return undefined;
    const env = message as Envelope;
    const handler = handlers[env.type] as ((p: unknown, s: Runtime.MessageSender) => Promise<unknown>) | undefined;
    if (!handler) return Promise.resolve({ ok: false, error: `unknown request ${String(env.type)}` });
    return handler(env.payload, sender).then(
      (value) => ({ ok: true, value }) as Reply<RequestType>,
      (err: unknown) => ({ ok: false, error: err instanceof Error ? err.message : String(err) }),
    );
  };
}
