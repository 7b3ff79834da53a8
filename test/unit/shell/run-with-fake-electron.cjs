// Loads the bundled desktop main process (app/shell/dist/main.cjs) with a stand-in for the
// `electron` module that records what the shell asks of it, then prints one JSON report.
// Used by main-bundle.test.ts where Electron's own binary is not available.
const Module = require('node:module');

const report = {
  webPreferences: null,
  loaded: null,
  permissions: [],
  windowOpen: {},
  opened: [],
  asked: [],
  navigation: null,
  privileged: null,
  handledScheme: null,
  ipc: {},
};
let windowOpenHandler;
let ipcHandler;
let contentsCreated;
const contents = {
  on(event, fn) {
    if (event === 'will-navigate') {
      const e = {
        prevented: false,
        preventDefault() {
          this.prevented = true;
        },
      };
      fn(e, 'https://elsewhere.example/');
      report.navigation = e.prevented ? 'blocked' : 'allowed';
    }
  },
  setWindowOpenHandler(fn) {
    windowOpenHandler = fn;
  },
  getURL: () => 'scalewright://app/index.html',
};
// The window's own contents and main frame, and a frame inside it.
const mainFrame = { url: 'scalewright://app/index.html' };
const ownContents = { reload() {}, mainFrame };
const electron = {
  app: {
    isPackaged: process.env.FAKE_PACKAGED === '1',
    requestSingleInstanceLock: () => true,
    on(event, fn) {
      if (event === 'web-contents-created') contentsCreated = fn;
    },
    whenReady: () => Promise.resolve(),
    isReady: () => true,
    quit() {},
  },
  BrowserWindow: function BrowserWindow(options) {
    report.webPreferences = options.webPreferences;
    return {
      loadFile: (f) => {
        report.loaded = `file ${f}`;
      },
      loadURL: (u) => {
        report.loaded = u;
        return Promise.resolve();
      },
      on() {},
      setTitle() {},
      webContents: ownContents,
      focus() {},
    };
  },
  Menu: { setApplicationMenu() {}, buildFromTemplate: (t) => t },
  dialog: {
    showErrorBox: (title, message) => {
      report.dialogError = `${title}: ${message}`;
    },
    showMessageBox: (_win, options) => {
      report.asked.push(options.detail);
      return Promise.resolve({ response: 0 });
    },
  },
  protocol: {
    registerSchemesAsPrivileged(schemes) {
      report.privileged = schemes;
    },
    handle(scheme) {
      report.handledScheme = scheme;
    },
  },
  ipcMain: {
    handle: (_channel, fn) => {
      ipcHandler = fn;
    },
  },
  session: {
    defaultSession: {
      setPermissionRequestHandler(fn) {
        fn(null, 'geolocation', (granted) => report.permissions.push(granted));
      },
      setPermissionCheckHandler(fn) {
        report.permissions.push(fn());
      },
    },
  },
  shell: {
    openExternal(url) {
      report.opened.push(url);
      return Promise.resolve();
    },
  },
};
const load = Module._load;
Module._load = function (request, ...rest) {
  return request === 'electron' ? electron : load.call(this, request, ...rest);
};
process.argv.push('--study', process.env.STUDY);
require(process.env.MAIN_BUNDLE);
setTimeout(async () => {
  contentsCreated?.({}, contents);
  for (const url of [
    'https://elsewhere.example/',
    'https://doi.org/10.0000/invented.example',
    'http://doi.org/10.0000/invented.example',
    'https://doi.org.elsewhere.example/',
    'file:///etc/passwd',
  ]) {
    report.windowOpen[url] = windowOpenHandler({ url }).action;
  }
  await new Promise((resolve) => setTimeout(resolve, 50));
  const own = { sender: ownContents, senderFrame: mainFrame };
  const calls = {
    own,
    foreign: { sender: ownContents, senderFrame: { url: 'https://elsewhere.example/' } },
    nullFrame: { sender: ownContents, senderFrame: null },
    fileFrame: { sender: ownContents, senderFrame: { url: 'file:///tmp/page.html' } },
    subframe: { sender: ownContents, senderFrame: { url: 'scalewright://app/index.html' } },
    otherContents: { sender: { mainFrame }, senderFrame: mainFrame },
  };
  for (const [name, event] of Object.entries(calls)) {
    report.ipc[name] = await ipcHandler(event, 'study.info', {});
  }
  report.ipc.badInput = await ipcHandler(own, 'facet.add', { name: 3 });
  process.stdout.write(JSON.stringify(report));
  process.exit(0);
}, 200);
