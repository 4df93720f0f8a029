-- Headless Neovim as a real client of `tandem lsp`: open the calc given
-- on the command line, start the server on it, wait for its diagnostics,
-- ask for a hover, write what came back to $TANDEM_NVIM_OUT, and quit.
-- Works from Neovim 0.7 (Debian's package) on. Run by editors/nvim/check.sh.
local out = os.getenv("TANDEM_NVIM_OUT") or "nvim-lsp.txt"
local tandem = os.getenv("TANDEM_BIN") or "tandem"
local lines = {}
local function say(s) table.insert(lines, s) end

local function run()
  local buf = vim.api.nvim_get_current_buf()
  local client = vim.lsp.start_client({
    name = "tandem",
    cmd = { tandem, "lsp" },
    root_dir = vim.fn.getcwd(),
  })
  if not client then
    say("error: the server did not start")
  else
    vim.lsp.buf_attach_client(buf, client)
    local got = vim.wait(10000, function()
      return #vim.diagnostic.get(buf) > 0
    end, 50)
    if not got then say("error: no diagnostics within 10 s") end
    for _, d in ipairs(vim.diagnostic.get(buf)) do
      -- lnum and col are 0-based in Neovim; shown 1-based like the CLI
      say(string.format("diagnostic %d:%d %s", d.lnum + 1, d.col + 1, (d.message:gsub("\n", " | "))))
    end
    -- a hover on the first `let`'s name
    local row
    for i, l in ipairs(vim.api.nvim_buf_get_lines(buf, 0, -1, false)) do
      if l:match("^let ") then row = i - 1 break end
    end
    if row then
      local params = {
        textDocument = { uri = vim.uri_from_bufnr(buf) },
        position = { line = row, character = 4 },
      }
      local res = vim.lsp.buf_request_sync(buf, "textDocument/hover", params, 5000)
      for _, r in pairs(res or {}) do
        if r.result and r.result.contents then
          say("hover " .. (r.result.contents.value or ""):gsub("\n", " | "))
        end
      end
    end
    vim.lsp.stop_client(client)
  end
  local f = io.open(out, "w")
  f:write(table.concat(lines, "\n") .. "\n")
  f:close()
  vim.cmd("qa!")
end

-- the file's buffer is loaded once startup is over
vim.api.nvim_create_autocmd("VimEnter", { callback = run })
