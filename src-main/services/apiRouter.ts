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
      if (!(err instanceof UserFacingError)) this.log(`${method} failed: ${err instanceof Error ? err.stack : message}`);
      return { ok: false, error: { code: 'failed', message } };
    }
    const checked = spec.reply.safeParse(reply);
    if (!checked.success) {
      this.log(`${method} produced an invalid reply: ${describeIssues(checked.error)}`);
      return { ok: false, error: { code: 'bad-reply', message: `${method}: internal reply did not match the contract` } };
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

  onEvent(listener: (e: EventEnvelope) => void): () => void {
    this.emitter.on('event', listener);
    return () => this.emitter.off('event', listener);
  }
}
