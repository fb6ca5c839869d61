import type { Runtime } from 'webextension-polyfill';
import { isEnvelope, type Envelope, type Reply, type RequestMap, type RequestType } from '../shared/messages';

/** Each handler gets the payload and who sent it (the overlay's tab and frame, for tab-bound work). */
export type Handlers = {
  [K in RequestType]: (payload: RequestMap[K]['payload'], sender: Runtime.MessageSender) => Promise<RequestMap[K]['reply']>;
};

/** Decides whether a sender may make a request: null to go ahead, or the refusal it is told. */
export type Guard = (type: RequestType, payload: unknown, sender: Runtime.MessageSender) => Promise<string | null>;

/**
 * Turns the handler table into a runtime.onMessage listener. Each request passes the guard first
 * (background/senders.ts: who may ask what). Errors become `{ ok: false }` replies so the sender
 * sees the message instead of a closed port.
 */
export function routeMessages(handlers: Handlers, guard: Guard) {
  return (message: unknown, sender: Runtime.MessageSender): Promise<Reply<RequestType>> | undefined => {
    if (!isEnvelope(message)) return undefined;
    const env = message as Envelope;
    const handler = Object.prototype.hasOwnProperty.call(handlers, env.type)
      ? (handlers[env.type] as (p: unknown, s: Runtime.MessageSender) => Promise<unknown>)
      : undefined;
    if (!handler) return Promise.resolve({ ok: false, error: `unknown request ${String(env.type)}` });
    return guard(env.type, env.payload, sender)
      .then((refused) => (refused === null ? handler(env.payload, sender) : Promise.reject(new Error(refused))))
      .then(
        (value) => ({ ok: true, value }) as Reply<RequestType>,
        (err: unknown) => ({ ok: false, error: err instanceof Error ? err.message : String(err) }),
      );
  };
}
