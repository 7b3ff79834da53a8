// Loads the bundled desktop main process (app/shell/dist/main.cjs) with a stand-in for the
// `electron` module that records what the shell asks of it, then prints one JSON report.
// Used by main-bundle.test.ts where Electron's own binary is not available.
const Module = require('node:module');

const report = {
  webPreferences: null,
  loaded: null,
  permissions: [],
  windowOpen: null,
  navigation: null,
  ipc: {},
};
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
    report.windowOpen = fn({ url: 'https://elsewhere.example/' }).action;
  },
  getURL: () => 'file:///app/index.html',
};
const electron = {
  app: {
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
        report.loaded = f;
      },
      on() {},
      setTitle() {},
      webContents: { reload() {} },
      focus() {},
    };
  },
  Menu: { setApplicationMenu() {}, buildFromTemplate: (t) => t },
  dialog: {
    showErrorBox: (title, message) => {
      report.dialogError = `${title}: ${message}`;
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
  shell: { openExternal() {} },
};
const load = Module._load;
Module._load = function (request, ...rest) {
  return request === 'electron' ? electron : load.call(this, request, ...rest);
};
process.argv.push('--study', process.env.STUDY);
require(process.env.MAIN_BUNDLE);
setTimeout(async () => {
  contentsCreated?.({}, contents);
  const own = { senderFrame: { url: 'file:///app/index.html' } };
  report.ipc.own = await ipcHandler(own, 'study.info', {});
  report.ipc.foreign = await ipcHandler(
    { senderFrame: { url: 'https://elsewhere.example/' } },
    'study.info',
    {},
  );
  report.ipc.badInput = await ipcHandler(own, 'facet.add', { name: 3 });
  process.stdout.write(JSON.stringify(report));
  process.exit(0);
}, 200);
