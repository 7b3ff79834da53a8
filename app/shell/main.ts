import path from 'node:path';
import {
  BrowserWindow,
  type IpcMainInvokeEvent,
  Menu,
  app,
  dialog,
  ipcMain,
  protocol,
  session as electronSession,
  shell,
} from 'electron';
import { STUDY_EXTENSION } from '../../db/study.ts';
import { dispatch } from '../api/dispatch.ts';
import { Session } from '../api/session.ts';
import { currentActor, readSettings, rememberRecent, writeSettings } from '../launch/user-data.ts';
import { APP_INDEX_URL, APP_SCHEME, appProtocolHandler, isAppUrl } from './app-protocol.ts';

/**
 * The desktop shell: one window on one study, the application menu, native file dialogs and
 * recent studies, printing to PDF. Hardened: sandboxed renderer with context isolation and no
 * Node integration, the interface served on its own scheme, the command table answered only to
 * that window's main frame, navigation and new windows denied (a few reference sites open in the
 * system browser after the user confirms), permissions denied by default.
 */
const APP_NAME = 'Scalewright desktop';
const RENDERER_DIST = path.join(__dirname, '..', '..', '..', 'renderer', 'dist');
const PRELOAD = path.join(__dirname, 'preload.cjs');
const STUDY_FILTER = [{ name: 'Scalewright study', extensions: [STUDY_EXTENSION.slice(1)] }];

/**
 * Sites a link in the interface may open, in the system browser and only after the user confirms:
 * the DOI resolver, which the methods' references link to.
 */
const EXTERNAL_HOSTS = ['doi.org'];

// The addon built for Electron by `npm start` in a checkout; a packaged build carries its own and
// never loads one named by the environment.
const studySession = new Session(currentActor(), APP_NAME, {
  nativeBinding: app.isPackaged ? undefined : process.env.SCALEWRIGHT_NATIVE_BINDING || undefined,
  saveDisplayName: (displayName) => writeSettings({ displayName }),
  recentStudies: { list: () => readSettings().recentStudies ?? [], remember: rememberRecent },
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
  void win.loadURL(APP_INDEX_URL);
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
      void offerExternal(url);
      return { action: 'deny' };
    });
  });
}

/** An https link to one of EXTERNAL_HOSTS, which may be opened in the system browser. */
function isAllowedExternal(url: string): boolean {
  try {
    const parsed = new URL(url);
    return parsed.protocol === 'https:' && EXTERNAL_HOSTS.includes(parsed.hostname) && parsed.port === '';
  } catch {
    return false;
  }
}

/** Opens an allowed link in the system browser once the user has confirmed it; ignores others. */
async function offerExternal(url: string): Promise<void> {
  if (!win || !isAllowedExternal(url)) return;
  const choice = await dialog.showMessageBox(win, {
    type: 'question',
    buttons: ['Open in browser', 'Cancel'],
    defaultId: 1,
    cancelId: 1,
    message: 'Open this link in your web browser?',
    detail: url,
  });
  if (choice.response === 0) await shell.openExternal(url);
}

/** A call comes from the app's own window, its main frame, showing the app's own page. */
function fromOwnPage(event: IpcMainInvokeEvent): boolean {
  const frame = event.senderFrame;
  return (
    win !== undefined &&
    event.sender === win.webContents &&
    frame !== null &&
    frame === win.webContents.mainFrame &&
    isAppUrl(frame.url)
  );
}

// Before the app is ready: the scheme is a standard, secure origin of its own.
protocol.registerSchemesAsPrivileged([
  { scheme: APP_SCHEME, privileges: { standard: true, secure: true, supportFetchAPI: true } },
]);

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
    protocol.handle(APP_SCHEME, appProtocolHandler(RENDERER_DIST));
    ipcMain.handle('scalewright:call', (event, name: unknown, input: unknown) => {
      if (!fromOwnPage(event)) {
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
