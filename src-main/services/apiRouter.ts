/**
 * The host-agnostic front door of the main side. Both hosts hand every incoming
 * call to `ApiRouter.call(method, payload)`; it validates the request against
 * src-shared/api.ts, runs the handler, validates the reply, and always answers
 * with an ApiResult (never throws). Events go out through `ApiRouter.events`,
 * validated the same way.
 */
import { EventEmitter } from 'node:events';
import {
  apiEvents,
  apiMethods,
  describeIssues,
  isApiMethod,
  type ApiEventName,
  type ApiEventPayload,
  type ApiMethod,
  type ApiReply,
  type ApiRequest,
  type ApiResult,
  type EventEnvelope,
} from '../../src-shared/api';

export type ApiHandlers = { [M in ApiMethod]: (request: ApiRequest<M>) => Promise<ApiReply<M>> };

/** Errors whose message is meant for the user (no stack, no internals). */
export class UserFacingError extends Error {}

export class ApiRouter {
  private readonly emitter = new EventEmitter();

  constructor(
    private readonly handlers: ApiHandlers,
    private readonly log: (line: string) => void = () => {},
  ) {
    this.emitter.setMaxListeners(50);
  }

  async call(method: unknown, payload: unknown): Promise<ApiResult<unknown>> {
    if (!isApiMethod(method)) {
      return { ok: false, error: { code: 'bad-method', message: `unknown method: ${String(method).slice(0, 100)}` } };
    }
    const spec = apiMethods[method];
    const parsed = spec.request.safeParse(payload ?? {});
    if (!parsed.success) {
      return { ok: false, error: { code: 'bad-request', message: `${method}: ${describeIssues(parsed.error)}` } };
    }
    let reply: unknown;
    try {
      const handler = this.handlers[method] as (r: unknown) => Promise<unknown>;
      reply = await handler(parsed.data);
    } catch (err) {
      const message = err instanceof Error ? err.message : String(err);
      if (!(err instanceof UserFacingError))
        this.log(`${method} failed: ${err instanceof Error ? err.stack : message}`);
      return { ok: false, error: { code: 'failed', message } };
    }
    const checked = spec.reply.safeParse(reply);
    if (!checked.success) {
      this.log(`${method} produced an invalid reply: ${describeIssues(checked.error)}`);
      return {
        ok: false,
        error: { code: 'bad-reply', message: `${method}: internal reply did not match the contract` },
      };
    }
    return { ok: true, data: checked.data };
  }

  /** Validate and publish an event to every connected host. */
  emit<E extends ApiEventName>(event: E, payload: ApiEventPayload<E>): void {
    const checked = apiEvents[event].safeParse(payload);
    if (!checked.success) {
      this.log(`event ${event} dropped: ${describeIssues(checked.error)}`);
      return;
    }
    this.emitter.emit('event', { event, payload: checked.data } as EventEnvelope);
  }

  /**
   * Subscribes a host's transport. This is the top-level guard for job results: a
   * transport that cannot carry an event (V8 refuses strings over ~512 MB, so the JSON
   * of a very large result throws) never takes the host down; the page instead gets a
   * `fit.error` for that job saying, in one sentence, that the result is too large to draw.
   */
  onEvent(listener: (e: EventEnvelope) => void): () => void {
    const guarded = (e: EventEnvelope) => {
      try {
        listener(e);
      } catch (err) {
        this.log(`event ${e.event} could not be delivered: ${err instanceof Error ? err.message : String(err)}`);
        const jobId = (e.payload as { jobId?: unknown }).jobId;
        if (e.event === 'fit.error' || typeof jobId !== 'string') return;
        try {
          listener({ event: 'fit.error', payload: { jobId, message: undeliverableMessage(e, err) } });
        } catch {
          // Not even the short notice could be sent; the page's own timeout takes over.
        }
      }
    };
    this.emitter.on('event', guarded);
    return () => this.emitter.off('event', guarded);
  }
}

/** Whether an error is the engine's or V8's refusal to build something that large. */
function isTooLarge(err: unknown): boolean {
  const e = err as { name?: string; code?: string; message?: string } | null;
  return (
    e?.name === 'RangeError' ||
    e?.code === 'ERR_STRING_TOO_LONG' ||
    /Invalid (string|array|typed array) length|Array buffer allocation failed|too large/i.test(e?.message ?? '')
  );
}

/** The one sentence the page shows when a job's result cannot reach it. */
export function undeliverableMessage(e: { event: string; payload: unknown }, err: unknown): string {
  const r = (e.payload as { result?: { rows?: unknown; cols?: unknown } }).result;
  const cells = typeof r?.rows === 'number' && typeof r?.cols === 'number' ? r.rows * r.cols : null;
  const size = cells !== null ? ` (${cells.toLocaleString('en-US')} cells)` : '';
  return isTooLarge(err)
    ? `The result is too large to draw in this window${size}; fit fewer rows or columns, or turn off spread.`
    : `The result could not be sent to this window (${err instanceof Error ? err.message : String(err)}).`;
}
