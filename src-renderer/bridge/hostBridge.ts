/**
 * The renderer's only way to the main side. It picks the Electron preload's
 * `rankfillHost` when present and the loopback HTTP host otherwise; nothing
 * else in the renderer knows which host it runs under. Replies and events are
 * validated against src-shared/api.ts on arrival.
 */
import {
  apiEvents,
  apiMethods,
  apiResultSchema,
  describeIssues,
  eventEnvelopeSchema,
  type ApiEventName,
  type ApiEventPayload,
  type ApiMethod,
  type ApiReply,
  type ApiRequest,
  type ApiResult,
} from '../../src-shared/api';
import { TOKEN_HEADER } from '../../src-shared/ipcChannels';

interface PreloadHost {
  kind: 'electron';
  call(method: string, payload: unknown): Promise<unknown>;
  onEvent(listener: (envelope: unknown) => void): () => void;
}

declare global {
  interface Window {
    rankfillHost?: PreloadHost;
  }
}

/** A call the main side refused or could not answer; `message` is for the user. */
export class ApiCallError extends Error {
  constructor(
    readonly method: string,
    readonly code: string,
    message: string,
  ) {
    super(message);
  }
}

type Transport = {
  call(method: string, payload: unknown): Promise<unknown>;
  subscribe(listener: (envelope: unknown) => void): void;
};

function electronTransport(host: PreloadHost): Transport {
  return { call: (m, p) => host.call(m, p), subscribe: (l) => void host.onEvent(l) };
}

/**
 * The API token of the browser host: from `#token=…` (the address printed for the user),
 * or traded once for a `#launch=…` nonce (the address the host hands to the system
 * browser, so the token itself never appears on a command line), or kept from earlier
 * in this tab. The fragment is removed from the address bar at once.
 */
async function readToken(): Promise<string> {
  const hash = new URLSearchParams(location.hash.replace(/^#/, ''));
  const fromHash = hash.get('token');
  const nonce = hash.get('launch');
  if (fromHash || nonce) history.replaceState(null, '', location.pathname + location.search);
  if (fromHash) {
    sessionStorage.setItem('rankfill.token', fromHash);
    return fromHash;
  }
  if (nonce) {
    try {
      const res = await fetch('/api/launch', {
        method: 'POST',
        headers: { 'Content-Type': 'application/json' },
        body: JSON.stringify({ nonce }),
      });
      const reply = (await res.json()) as { ok?: boolean; data?: { token?: unknown } };
      if (reply.ok && typeof reply.data?.token === 'string') {
        sessionStorage.setItem('rankfill.token', reply.data.token);
        return reply.data.token;
      }
    } catch {
      // Fall through: a token kept in this tab, or none (calls then say the token is wrong).
    }
  }
  return sessionStorage.getItem('rankfill.token') ?? '';
}

function httpTransport(): Transport {
  const tokenReady = readToken();
  return {
    async call(method, payload) {
      const token = await tokenReady;
      const res = await fetch('/api/call', {
        method: 'POST',
        headers: { 'Content-Type': 'application/json', [TOKEN_HEADER]: token },
        body: JSON.stringify({ method, payload }),
      });
      return res.json();
    },
    subscribe(listener) {
      void tokenReady.then((token) => {
        const source = new EventSource(`/api/events?token=${encodeURIComponent(token)}`);
        source.onmessage = (e) => {
          try {
            listener(JSON.parse(e.data as string));
          } catch {
            // A malformed event is dropped; the envelope check below would refuse it anyway.
          }
        };
      });
    },
  };
}

export class HostBridge {
  private readonly listeners = new Map<ApiEventName, Set<(payload: unknown) => void>>();
  readonly kind: 'electron' | 'browser';

  constructor(
    private readonly transport: Transport,
    kind: 'electron' | 'browser',
  ) {
    this.kind = kind;
    transport.subscribe((raw) => this.dispatch(raw));
  }

  async call<M extends ApiMethod>(method: M, request: ApiRequest<M>): Promise<ApiReply<M>> {
    let raw: unknown;
    try {
      raw = await this.transport.call(method, request);
    } catch (err) {
      throw new ApiCallError(
        method,
        'transport',
        `Rankfill lost contact with its main side (${err instanceof Error ? err.message : String(err)}).`,
      );
    }
    const envelope = apiResultSchema.safeParse(raw);
    if (!envelope.success)
      throw new ApiCallError(method, 'bad-reply', `${method}: the reply did not match the contract`);
    const result = envelope.data as ApiResult<unknown>;
    if (!result.ok) throw new ApiCallError(method, result.error.code, result.error.message);
    const reply = apiMethods[method].reply.safeParse(result.data);
    if (!reply.success) throw new ApiCallError(method, 'bad-reply', `${method}: ${describeIssues(reply.error)}`);
    return reply.data as ApiReply<M>;
  }

  on<E extends ApiEventName>(event: E, listener: (payload: ApiEventPayload<E>) => void): () => void {
    let set = this.listeners.get(event);
    if (!set) this.listeners.set(event, (set = new Set()));
    const l = listener as (payload: unknown) => void;
    set.add(l);
    return () => set.delete(l);
  }

  private dispatch(raw: unknown): void {
    const env = eventEnvelopeSchema.safeParse(raw);
    if (!env.success) return;
    const payload = apiEvents[env.data.event].safeParse(env.data.payload);
    if (!payload.success) return;
    for (const l of this.listeners.get(env.data.event) ?? []) l(payload.data);
  }
}

export function connectToHost(): HostBridge {
  const host = window.rankfillHost;
  if (host && host.kind === 'electron') return new HostBridge(electronTransport(host), 'electron');
  return new HostBridge(httpTransport(), 'browser');
}
