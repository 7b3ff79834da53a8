import { contextBridge, ipcRenderer } from 'electron';

/**
 * The one object the renderer sees in the desktop app. It forwards calls to the command table in
 * the main process; ipcRenderer itself is never exposed.
 */
const bridge = Object.freeze({
  call: (name: string, input: unknown) => ipcRenderer.invoke('scalewright:call', name, input),
});

contextBridge.exposeInMainWorld('scalewright', bridge);
