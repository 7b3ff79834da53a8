import path from 'node:path';
import { BrowserWindow, Menu, app, dialog, ipcMain, session as electronSession, shell } from 'electron';
import { STUDY_EXTENSION } from '../../db/study.ts';
import { dispatch } from '../api/dispatch.ts';
import { Session } from '../api/session.ts';
import { currentActor, readSettings, rememberRecent, writeSettings } from '../launch/user-data.ts';

/**
 * The desktop shell: one window on one study, the application menu, native file dialogs and
 * recent studies, printing to PDF. Hardened: sandboxed renderer with context isolation and no
 * Node integration, navigation and new windows denied, permissions denied by default.
 */
const APP_NAME = 'Scalewright desktop';
const RENDERER_INDEX = path.join(__dirname, '..', '..', '..', 'renderer', 'dist', 'index.html');
const PRELOAD = path.join(__dirname, 'preload.cjs');
const STUDY_FILTER = [{ name: 'Scalewright study', extensions: [STUDY_EXTENSION.slice(1)] }];

const studySession = new Session(currentActor(), APP_NAME, {
  nativeBinding: process.env.SCALEWRIGHT_NATIVE_BINDING || undefined,
  saveDisplayName: (displayName) => writeSettings({ displayName }),
});
let win: BrowserWindow | undefined;

function studyFromArgs(argv: string[]): string | undefined {
  const flag = argv.indexOf('--study');
  if (flag >= 0 && argv[flag + 1]) return argv[flag + 1];
  return argv.find((a) => a.endsWith(STUDY_EXTENSION));
}

function openStudy(file: string): void {
  try {
    studySession.open(file);
    rememberRecent(studySession.study.path);
    win?.setTitle(`${path.basename(file)} — Scalewright`);
    win?.webContents.reload();
    buildMenu();
  } catch (error) {
    dialog.showErrorBox('The study could not be opened', (error as Error).message);
  }
}

async function chooseAndOpen(): Promise<void> {
  if (!win) return;
  const result = await dialog.showOpenDialog(win, { properties: ['openFile'], filters: STUDY_FILTER });
  if (!result.canceled && result.filePaths[0]) openStudy(result.filePaths[0]);
}

async function chooseAndCreate(): Promise<void> {
  if (!win) return;
  const result = await dialog.showSaveDialog(win, {
    filters: STUDY_FILTER,
    defaultPath: `new-study${STUDY_EXTENSION}`,
  });
  if (result.canceled || !result.filePath) return;
  try {
    studySession.create(result.filePath, path.basename(result.filePath, STUDY_EXTENSION));
    openStudy(studySession.study.path);
  } catch (error) {
    dialog.showErrorBox('The study could not be created', (error as Error).message);
  }
}

async function printToPdf(): Promise<void> {
  if (!win) return;
  const result = await dialog.showSaveDialog(win, { filters: [{ name: 'PDF', extensions: ['pdf'] }] });
  if (result.canceled || !result.filePath) return;
  const pdf = await win.webContents.printToPDF({ printBackground: true, pageSize: 'A4' });
  const { writeFile } = await import('node:fs/promises');
  await writeFile(result.filePath, pdf);
}

function buildMenu(): void {
  const recent = (readSettings().recentStudies ?? []).map((file) => ({
    label: file,
    click: () => openStudy(file),
  }));
  Menu.setApplicationMenu(
    Menu.buildFromTemplate([
      ...(process.platform === 'darwin' ? [{ role: 'appMenu' as const }] : []),
      {
        label: 'File',
        submenu: [
          { label: 'New Study…', accelerator: 'CmdOrCtrl+N', click: () => void chooseAndCreate() },
          { label: 'Open Study…', accelerator: 'CmdOrCtrl+O', click: () => void chooseAndOpen() },
          {
            label: 'Open Recent',
            submenu: recent.length > 0 ? recent : [{ label: 'No recent studies', enabled: false }],
          },
          { type: 'separator' },
          { label: 'Print to PDF…', accelerator: 'CmdOrCtrl+P', click: () => void printToPdf() },
          { type: 'separator' },
          { role: process.platform === 'darwin' ? 'close' : 'quit' },
        ],
      },
      { role: 'editMenu' },
      {
        label: 'View',
        submenu: [
          { role: 'reload' },
          { role: 'resetZoom' },
          { role: 'zoomIn' },
          { role: 'zoomOut' },
          { role: 'togglefullscreen' },
        ],
      },
      { role: 'windowMenu' },
    ]),
  );
}

function createWindow(): void {
  win = new BrowserWindow({
    width: 1360,
    height: 900,
    title: 'Scalewright',
    webPreferences: {
      preload: PRELOAD,
      sandbox: true,
      contextIsolation: true,
      nodeIntegration: false,
      webSecurity: true,
      spellcheck: true,
    },
  });
  win.loadFile(RENDERER_INDEX);
  win.on('closed', () => {
    win = undefined;
  });
}

function harden(): void {
  const ses = electronSession.defaultSession;
  ses.setPermissionRequestHandler((_contents, _permission, callback) => callback(false));
  ses.setPermissionCheckHandler(() => false);
  app.on('web-contents-created', (_event, contents) => {
    contents.on('will-navigate', (event, url) => {
      if (url !== contents.getURL()) event.preventDefault();
    });
    contents.on('will-attach-webview', (event) => event.preventDefault());
    contents.setWindowOpenHandler(({ url }) => {
      if (url.startsWith('https://')) void shell.openExternal(url);
      return { action: 'deny' };
    });
  });
}

if (!app.requestSingleInstanceLock()) {
  app.quit();
} else {
  app.on('second-instance', (_event, argv) => {
    const file = studyFromArgs(argv);
    if (file) openStudy(file);
    win?.focus();
  });
  app.on('open-file', (event, file) => {
    event.preventDefault();
    if (app.isReady()) openStudy(file);
    else process.argv.push('--study', file);
  });
  app.whenReady().then(() => {
    harden();
    ipcMain.handle('scalewright:call', (event, name: unknown, input: unknown) => {
      if (event.senderFrame?.url && !event.senderFrame.url.startsWith('file://')) {
        return {
          ok: false,
          error: { code: 'forbidden', message: 'calls are accepted only from the app’s own pages' },
        };
      }
      return dispatch(studySession, name, input);
    });
    createWindow();
    const file = studyFromArgs(process.argv);
    if (file) openStudy(file);
    buildMenu();
  });
  app.on('window-all-closed', () => {
    void studySession.shutdown().finally(() => app.quit());
  });
}
