// Starts `tandem lsp` for calc files (the language server does the work).
const vscode = require("vscode");
const { LanguageClient } = require("vscode-languageclient/node");

let client;

function activate() {
  const command = vscode.workspace.getConfiguration("tandem").get("path") || "tandem";
  client = new LanguageClient(
    "tandem",
    "tandem",
    { command, args: ["lsp"] },
    { documentSelector: [{ scheme: "file", language: "tandem" }] }
  );
  return client.start();
}

function deactivate() {
  return client ? client.stop() : undefined;
}

module.exports = { activate, deactivate };
