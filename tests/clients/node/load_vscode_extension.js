// Loads editors/vscode/extension.js with stand-ins for `vscode` and
// `vscode-languageclient/node`, activates it, and prints as JSON what it would
// launch and which settings its middleware would pass to the server.
//
//   node load_vscode_extension.js <extension.js> '<notelsp settings as JSON>'
"use strict";

const Module = require("node:module");

const [extensionPath, settingsJson] = process.argv.slice(2);
const userSettings = JSON.parse(settingsJson || "{}");
const seen = { commands: [] };

const vscodeStandIn = {
  workspace: {
    getConfiguration: (section) => ({
      get: (key) => (section === "notelsp" && key === "server.command" ? userSettings.server?.command : undefined),
    }),
    createFileSystemWatcher: (glob) => ({ glob }),
  },
  commands: {
    registerCommand: (name) => { seen.commands.push(name); return { dispose() {} }; },
  },
};

class LanguageClientStandIn {
  constructor(id, name, serverOptions, clientOptions) {
    Object.assign(seen, { id, name, serverOptions, clientOptions });
  }
  async start() { seen.started = true; }
  async stop() {}
}

const languageClientStandIn = { LanguageClient: LanguageClientStandIn, TransportKind: { stdio: 0, ipc: 1 } };
const load = Module._load;
Module._load = function (request, ...rest) {
  if (request === "vscode") return vscodeStandIn;
  if (request === "vscode-languageclient/node") return languageClientStandIn;
  return load.call(this, request, ...rest);
};

async function main() {
  const extension = require(extensionPath);
  await extension.activate({ subscriptions: [] });
  const options = seen.clientOptions;
  // What VS Code would answer for the "notelsp" section, through the extension's middleware.
  const params = { items: [{ section: "notelsp" }] };
  const passed = await options.middleware.workspace.configuration(params, null, async () => [userSettings]);
  process.stdout.write(JSON.stringify({
    id: seen.id,
    started: seen.started === true,
    commands: seen.commands,
    command: [seen.serverOptions.command, ...seen.serverOptions.args],
    transport: seen.serverOptions.transport,
    documentSelector: options.documentSelector,
    configurationSection: options.synchronize.configurationSection,
    watched: options.synchronize.fileEvents.glob,
    passed: passed[0],
  }) + "\n");
}

main().catch((error) => { process.stdout.write(JSON.stringify({ error: String(error.stack || error) }) + "\n"); process.exitCode = 1; });
