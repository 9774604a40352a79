// Drives the notelsp server over stdio with vscode-jsonrpc and prints what it received as JSON.
//
//   node drive.js '<server command as a JSON list>' <note file>
//
// Steps: initialize, initialized, didOpen, wait for publishDiagnostics, hover on
// the first annotation, codeAction for the first diagnostic, shutdown, exit.
// Any failure is reported as {"error": ...} on stdout with exit code 1.
"use strict";

const { spawn } = require("node:child_process");
const fs = require("node:fs");
const path = require("node:path");
const { pathToFileURL } = require("node:url");
const rpc = require("vscode-jsonrpc/node");

const STEP_TIMEOUT_MS = 30000;

function withTimeout(promise, what) {
  let timer;
  const expired = new Promise((_, reject) => {
    timer = setTimeout(() => reject(new Error(`timed out waiting for ${what}`)), STEP_TIMEOUT_MS);
  });
  return Promise.race([promise, expired]).finally(() => clearTimeout(timer));
}

// LSP positions count UTF-16 code units, which is what JavaScript string indices are.
function positionOf(text, index) {
  const before = text.slice(0, index);
  const line = before.split("\n").length - 1;
  return { line, character: index - (before.lastIndexOf("\n") + 1) };
}

async function drive(command, notePath) {
  const result = { steps: [] };
  const text = fs.readFileSync(notePath, "utf8");
  const uri = pathToFileURL(notePath).href;
  const root = pathToFileURL(path.dirname(notePath)).href;

  const server = spawn(command[0], command.slice(1), { stdio: ["pipe", "pipe", "pipe"] });
  const exited = new Promise((resolve) => server.on("exit", (code) => resolve(code)));
  let stderr = "";
  server.stderr.on("data", (chunk) => { stderr += chunk; });

  const connection = rpc.createMessageConnection(
    new rpc.StreamMessageReader(server.stdout),
    new rpc.StreamMessageWriter(server.stdin),
  );
  // Requests the server may make of a client: answer like a client with no settings.
  connection.onRequest((method, params) => {
    result.steps.push(`server asked ${method}`);
    if (method === "workspace/configuration") return params.items.map(() => null);
    return null;
  });
  const published = new Promise((resolve) => {
    connection.onNotification("textDocument/publishDiagnostics", (params) => {
      if (params.uri === uri) resolve(params);
    });
  });
  connection.onNotification(() => {});
  connection.listen();

  try {
    const initialized = await withTimeout(connection.sendRequest("initialize", {
      processId: process.pid,
      clientInfo: { name: "notelsp-node-test-client" },
      rootUri: root,
      workspaceFolders: [{ uri: root, name: path.basename(path.dirname(notePath)) }],
      capabilities: {
        general: { positionEncodings: ["utf-16"] },
        textDocument: {
          synchronization: { dynamicRegistration: false },
          publishDiagnostics: { relatedInformation: true },
          hover: { contentFormat: ["markdown", "plaintext"] },
          codeAction: { codeActionLiteralSupport: { codeActionKind: { valueSet: ["quickfix"] } } },
        },
        workspace: { configuration: true },
      },
    }), "initialize");
    result.server = initialized.serverInfo;
    result.capabilities = initialized.capabilities;
    await connection.sendNotification("initialized", {});
    result.steps.push("initialized");

    await connection.sendNotification("textDocument/didOpen", {
      textDocument: { uri, languageId: "markdown", version: 1, text },
    });
    const diagnostics = await withTimeout(published, "publishDiagnostics");
    result.diagnostics = diagnostics.diagnostics;
    result.steps.push("diagnostics");

    const brace = text.indexOf("{");
    result.hover = await withTimeout(connection.sendRequest("textDocument/hover", {
      textDocument: { uri },
      position: positionOf(text, brace + 1),
    }), "hover");
    result.steps.push("hover");

    const first = result.diagnostics[0];
    if (first) {
      const actions = await withTimeout(connection.sendRequest("textDocument/codeAction", {
        textDocument: { uri },
        range: first.range,
        context: { diagnostics: [first] },
      }), "codeAction");
      result.actions = actions || [];
      result.steps.push("codeAction");
    }

    await withTimeout(connection.sendRequest("shutdown"), "shutdown");
    await connection.sendNotification("exit");
    result.exit_code = await withTimeout(exited, "the server to exit");
    result.steps.push("exited");
  } catch (error) {
    result.error = String(error && error.stack ? error.stack : error);
    result.stderr = stderr;
    server.kill();
  } finally {
    connection.dispose();
  }
  return result;
}

async function main() {
  const [commandJson, notePath] = process.argv.slice(2);
  if (!commandJson || !notePath) {
    process.stdout.write(JSON.stringify({ error: "usage: node drive.js '<command JSON list>' <note>" }) + "\n");
    return 2;
  }
  const result = await drive(JSON.parse(commandJson), path.resolve(notePath));
  process.stdout.write(JSON.stringify(result) + "\n");
  return result.error ? 1 : 0;
}

main().then((code) => { process.exitCode = code; });
