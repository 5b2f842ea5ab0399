/**
 * The Electron adapter of the API router: one invoke channel for calls (only
 * from our own page), one send channel for events.
 */
import type { IpcMain, IpcMainInvokeEvent, WebContents } from 'electron';
import type { ApiResult } from '../../../src-shared/api';
import { IPC_CALL_CHANNEL, IPC_EVENT_CHANNEL } from '../../../src-shared/ipcChannels';
import type { ApiRouter } from '../../services/apiRouter';
import { isAppUrl } from './securityGuards';

export function registerIpc(ipcMain: IpcMain, router: ApiRouter, targets: () => WebContents[]): () => void {
  ipcMain.handle(
    IPC_CALL_CHANNEL,
    async (event: IpcMainInvokeEvent, method: unknown, payload: unknown): Promise<ApiResult<unknown>> => {
      const frameUrl = event.senderFrame?.url ?? '';
      if (!isAppUrl(frameUrl)) {
        return {
          ok: false,
          error: { code: 'unauthorized', message: 'calls are accepted only from the Rankfill page' },
        };
      }
      return router.call(method, payload);
    },
  );
  const unsubscribe = router.onEvent((envelope) => {
    for (const wc of targets()) if (!wc.isDestroyed()) wc.send(IPC_EVENT_CHANNEL, envelope);
  });
  return () => {
    ipcMain.removeHandler(IPC_CALL_CHANNEL);
    unsubscribe();
  };
}
