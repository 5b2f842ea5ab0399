/**
 * One API call to a running browser host, as the page makes it (token header, JSON body).
 * The reply is typed loosely: `T` names the fields a test reads from `data`.
 */
import { TOKEN_HEADER } from '../../../src-shared/ipcChannels';
import type { RunningHost } from './hostProcess';

export interface ApiReply<T> {
  ok: boolean;
  data?: T;
  error?: { code?: string; message?: string };
}

export async function callApi<T = Record<string, unknown>>(
  host: RunningHost,
  method: string,
  payload: unknown,
): Promise<ApiReply<T>> {
  const res = await fetch(new URL('/api/call', host.url), {
    method: 'POST',
    headers: { 'Content-Type': 'application/json', [TOKEN_HEADER]: host.token },
    body: JSON.stringify({ method, payload }),
  });
  return (await res.json()) as ApiReply<T>;
}

/** What the page exposes as `window.rankfillApp` for assertions (only the parts tests read). */
export interface PageWithApp {
  rankfillApp: {
    store: {
      title: string;
      current: {
        rowLabels: string[];
        colLabels: string[];
        values: Float64Array;
        scale: { min: number; max: number; step: number };
      };
    };
  };
}
