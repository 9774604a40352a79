-- Drives headless Neovim with editors/neovim's setup({ settings = ... }) and writes the diagnostic
-- codes it ends up with to JSON. Neovim 0.7 offers no workspace/configuration: the module pushes the
-- settings with workspace/didChangeConfiguration from on_init, and the server must apply them.
-- Inputs from the environment: NOTELSP_EDITORS, NOTELSP_CMD (JSON list), NOTELSP_NOTE, NOTELSP_OUT.
local out = {}

local function codes(buf)
  local found = {}
  for _, d in ipairs(vim.diagnostic.get(buf)) do
    local code = d.code or (d.user_data and d.user_data.lsp and d.user_data.lsp.code)
    if code then found[code] = true end
  end
  return found
end

local function run()
  vim.opt.runtimepath:append(os.getenv("NOTELSP_EDITORS"))
  require("notelsp").setup({
    cmd = vim.fn.json_decode(os.getenv("NOTELSP_CMD")),
    settings = { notelsp = { disabled = { "wrong-shape" } } },
  })
  vim.cmd("edit " .. vim.fn.fnameescape(os.getenv("NOTELSP_NOTE")))
  local buf = vim.api.nvim_get_current_buf()
  -- Done when the rule left on is shown and the one switched off is not (the first publication
  -- may come before the pushed settings arrive; a review may be published in parts).
  out.settled = vim.wait(30000, function()
    local now = codes(buf)
    return now["wrong-hybridization"] and not now["wrong-shape"] and not now["review-continues"]
  end, 50)
  out.codes = vim.tbl_keys(codes(buf))
end

local ok, err = pcall(run)
if not ok then out.error = tostring(err) end
vim.fn.writefile({ vim.fn.json_encode(out) }, os.getenv("NOTELSP_OUT"))
vim.cmd("qa!")
