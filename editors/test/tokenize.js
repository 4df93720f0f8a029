// Tokenize calc files with editors/tandem.tmLanguage.json through
// vscode-textmate and vscode-oniguruma, the engine VS Code uses. Prints one
// JSON object: for each file, for each line, its tokens (start and end in
// UTF-16 units, and scopes). Usage: node tokenize.js GRAMMAR FILE...
const fs = require("fs");
const path = require("path");
const vsctm = require("vscode-textmate");
const oniguruma = require("vscode-oniguruma");

async function main() {
  const [grammarPath, ...files] = process.argv.slice(2);
  const wasm = fs.readFileSync(
    path.join(path.dirname(require.resolve("vscode-oniguruma")), "onig.wasm")
  );
  await oniguruma.loadWASM(wasm.buffer);
  const registry = new vsctm.Registry({
    onigLib: Promise.resolve({
      createOnigScanner: (p) => new oniguruma.OnigScanner(p),
      createOnigString: (s) => new oniguruma.OnigString(s),
    }),
    loadGrammar: async (scope) =>
      scope === "source.tandem"
        ? vsctm.parseRawGrammar(fs.readFileSync(grammarPath, "utf8"), grammarPath)
        : null,
  });
  const grammar = await registry.loadGrammar("source.tandem");
  const out = {};
  for (const f of files) {
    let state = vsctm.INITIAL;
    out[f] = fs
      .readFileSync(f, "utf8")
      .split("\n")
      .map((line) => {
        const r = grammar.tokenizeLine(line, state);
        state = r.ruleStack;
        return r.tokens.map((t) => [t.startIndex, t.endIndex, t.scopes]);
      });
  }
  process.stdout.write(JSON.stringify(out));
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
