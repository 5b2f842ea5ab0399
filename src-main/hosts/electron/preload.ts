/**
 * The sandboxed preload: exposes exactly two functions to the page, `call` and
 * `onEvent`, which carry the typed API over IPC. Nothing else of Node or
 * Electron reaches the renderer.
 */
import { contextBridge, ipcRenderer, type IpcRendererEvent } from 'electron';
import { IPC_CALL_CHANNEL, IPC_EVENT_CHANNEL } from '../../../src-shared/ipcChannels';

contextBridge.exposeInMainWorld('rankfillHost', {
  kind: 'electron',
  call: (method: string, payload: unknown): Promise<unknown> => ipcRenderer.invoke(IPC_CALL_CHANNEL, method, payload),
  onEvent: (listener: (envelope: unknown) => void): (() => void) => {
    const wrapped = (_e: IpcRendererEvent, envelope: unknown) => listener(envelope);
    ipcRenderer.on(IPC_EVENT_CHANNEL, wrapped);
    return () => ipcRenderer.off(IPC_EVENT_CHANNEL, wrapped);
  },
});
