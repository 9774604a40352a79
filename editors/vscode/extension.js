// notelsp for VS Code: starts `notelsp serve` over stdio for Markdown and plain-text files.
"use strict";

const vscode = require("vscode");
const { LanguageClient, TransportKind } = require("vscode-languageclient/node");

const SECTION = "notelsp";
const DEFAULT_COMMAND = ["notelsp", "serve"];
let client;

// The server knows only its review keys: drop the launcher's own setting and
// unset (null) values, so .notelsp.toml still decides what the user left unset.
function reviewSettings(value) {
  const settings = {};
  for (const [key, setting] of Object.entries(value || {})) {
    if (key !== "server" && setting !== null && setting !== undefined) settings[key] = setting;
  }
  return settings;
}

function serverOptions() {
  const configured = vscode.workspace.getConfiguration(SECTION).get("server.command");
  const command = Array.isArray(configured) && configured.length > 0 ? configured : DEFAULT_COMMAND;
  return { command: command[0], args: command.slice(1), transport: TransportKind.stdio };
}

function clientOptions() {
  return {
    documentSelector: [
      { scheme: "file", language: "markdown" },
      { scheme: "file", language: "plaintext" },
    ],
    synchronize: {
      configurationSection: SECTION,
      fileEvents: vscode.workspace.createFileSystemWatcher("**/.notelsp.toml"),
    },
    middleware: {
      workspace: {
        configuration: async (params, token, next) => {
          const answers = await next(params, token);
          if (!Array.isArray(answers)) return answers;
          return answers.map((value, index) => (params.items[index].section === SECTION ? reviewSettings(value) : value));
        },
      },
    },
  };
}

async function activate(context) {
  client = new LanguageClient("notelsp", "notelsp", serverOptions(), clientOptions());
  context.subscriptions.push(
    vscode.commands.registerCommand("notelsp.restartServer", () => client.restart()),
  );
  await client.start();
}

function deactivate() {
  return client ? client.stop() : undefined;
}

module.exports = { activate, deactivate, reviewSettings };
