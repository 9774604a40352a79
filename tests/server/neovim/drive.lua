-- Drives headless Neovim against notelsp and writes what Neovim received to a JSON file.
-- Inputs from the environment: NOTELSP_EDITORS (editors/neovim), NOTELSP_CMD (JSON list),
-- NOTELSP_NOTE (the note to open), NOTELSP_OUT (result file).
local out = { steps = {} }

local function finish()
  vim.fn.writefile({ vim.fn.json_encode(out) }, os.getenv("NOTELSP_OUT"))
  vim.cmd("qa!")
end

local function run()
  vim.opt.runtimepath:append(os.getenv("NOTELSP_EDITORS"))
  require("notelsp").setup({ cmd = vim.fn.json_decode(os.getenv("NOTELSP_CMD")) })
  vim.cmd("edit " .. vim.fn.fnameescape(os.getenv("NOTELSP_NOTE")))
  local buf = vim.api.nvim_get_current_buf()
  out.filetype = vim.bo[buf].filetype

  -- get_clients is 0.10+; buf_get_clients (0.7-0.11) is gone in later versions
  local function clients()
    if vim.lsp.get_clients then return vim.lsp.get_clients({ bufnr = buf }) end
    return vim.lsp.buf_get_clients(buf)
  end
  local attached = vim.wait(20000, function() return #clients() > 0 end, 50)
  table.insert(out.steps, "attached=" .. tostring(attached))
  local got = vim.wait(30000, function() return #vim.diagnostic.get(buf) > 0 end, 50)
  table.insert(out.steps, "diagnostics=" .. tostring(got))
  out.diagnostics = {}
  for _, d in ipairs(vim.diagnostic.get(buf)) do
    local lsp = d.user_data and d.user_data.lsp or {}
    table.insert(out.diagnostics, {
      lnum = d.lnum, col = d.col, end_col = d.end_col, message = d.message,
      source = d.source, code = d.code or lsp.code, severity = d.severity,
    })
  end

  local line = vim.api.nvim_buf_get_lines(buf, 0, -1, false)
  local row, col
  for index, text in ipairs(line) do
    local found = text:find("{", 1, true)
    if found then row, col = index - 1, found end
  end
  local uri = vim.uri_from_bufnr(buf)
  local hover = vim.lsp.buf_request_sync(buf, "textDocument/hover",
    { textDocument = { uri = uri }, position = { line = row, character = col + 1 } }, 15000)
  for _, answer in pairs(hover or {}) do
    if answer.result then out.hover = answer.result.contents end
  end

  local function wrong_shape()
    for _, d in ipairs(vim.diagnostic.get(buf)) do
      local code = d.code or (d.user_data and d.user_data.lsp and d.user_data.lsp.code)
      if code == "wrong-shape" then return d end
    end
  end
  local d = wrong_shape()
  if d then
    -- rebuild the LSP diagnostic: 0.7 keeps only the extra fields in user_data.lsp
    local range = { start = { line = d.lnum, character = d.col }, ["end"] = { line = d.end_lnum, character = d.end_col } }
    local lsp_diagnostic = { range = range, message = d.message, severity = d.severity, source = d.source, code = "wrong-shape" }
    local actions = vim.lsp.buf_request_sync(buf, "textDocument/codeAction", {
      textDocument = { uri = uri },
      range = range,
      context = { diagnostics = { lsp_diagnostic } },
    }, 15000)
    out.actions = {}
    for _, answer in pairs(actions or {}) do
      if answer.err then out.action_error = vim.inspect(answer.err) end
      for _, action in ipairs(answer.result or {}) do
        table.insert(out.actions, action.title)
        if action.kind == "quickfix" and out.applied == nil then
          vim.lsp.util.apply_workspace_edit(action.edit, "utf-16")
          out.applied = action.title
        end
      end
    end
    out.after_fix = vim.api.nvim_buf_get_lines(buf, 0, -1, false)
    -- the finding must go away once the server sees the edit
    out.cleared = vim.wait(30000, function() return wrong_shape() == nil end, 50)
  end
end

local ok, err = pcall(run)
if not ok then out.error = tostring(err) end
finish()
