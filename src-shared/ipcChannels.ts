/**
 * Transport names shared by the hosts and the renderer's bridge. Kept free of
 * imports so the sandboxed Electron preload can bundle it on its own.
 */
export const IPC_CALL_CHANNEL = 'rankfill:call';
export const IPC_EVENT_CHANNEL = 'rankfill:event';
/** The header carrying the per-launch token on the HTTP host. */
export const TOKEN_HEADER = 'x-rankfill-token';
/** The custom scheme the Electron window loads the renderer from. */
export const APP_SCHEME = 'rankfill';
export const APP_ORIGIN = `${APP_SCHEME}://app`;
