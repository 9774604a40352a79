-- notelsp for Neovim: require("notelsp").setup({ ... }) from your init.lua.
-- Uses vim.lsp.config/vim.lsp.enable on Neovim 0.11+, and vim.lsp.start_client
-- (one client per workspace root) on 0.7-0.10.
local M = {}

M.defaults = {
  cmd = { "notelsp", "serve" },
  filetypes = { "markdown", "text" },
  root_markers = { ".notelsp.toml", ".git" },
  -- The "notelsp" section: answered to workspace/configuration, and pushed with
  -- workspace/didChangeConfiguration at start (on_init below does that for
  -- Neovim 0.7; the server applies either). Same keys as the [review] table of .notelsp.toml
  -- (inlay_hints, disabled, severity, ...), over that file.
  settings = { notelsp = {} },
}

local function find_root(path, markers)
  local dir = vim.fn.fnamemodify(path, ":p:h")
  for _, marker in ipairs(markers) do
    local file = vim.fn.findfile(marker, dir .. ";")
    if file ~= "" then
      return vim.fn.fnamemodify(file, ":p:h")
    end
    local folder = vim.fn.finddir(marker, dir .. ";")
    if folder ~= "" then
      return vim.fn.fnamemodify(folder, ":p:h:h")
    end
  end
  return dir
end

local function setup_modern(opts)
  vim.lsp.config("notelsp", {
    cmd = opts.cmd,
    filetypes = opts.filetypes,
    root_markers = opts.root_markers,
    settings = opts.settings,
  })
  vim.lsp.enable("notelsp")
end

local function setup_legacy(opts)
  local clients = {} -- root -> client id
  vim.api.nvim_create_autocmd("FileType", {
    pattern = opts.filetypes,
    group = vim.api.nvim_create_augroup("notelsp", { clear = true }),
    callback = function(args)
      local root = find_root(vim.api.nvim_buf_get_name(args.buf), opts.root_markers)
      local id = clients[root]
      if id == nil or vim.lsp.get_client_by_id(id) == nil then
        id = vim.lsp.start_client({
          name = "notelsp",
          cmd = opts.cmd,
          root_dir = root,
          workspace_folders = { { uri = vim.uri_from_fname(root), name = root } },
          settings = opts.settings,
          -- Neovim before 0.8 neither offers workspace/configuration nor sends its settings by
          -- itself ("should be sent during on_init", :help vim.lsp.start_client): push them.
          on_init = function(client)
            client.notify("workspace/didChangeConfiguration", { settings = client.config.settings })
          end,
        })
        clients[root] = id
      end
      if id then
        vim.lsp.buf_attach_client(args.buf, id)
      end
    end,
  })
end

function M.setup(user)
  local opts = vim.tbl_deep_extend("force", M.defaults, user or {})
  if type(vim.lsp.config) == "table" and vim.lsp.enable ~= nil then
    setup_modern(opts)
  else
    setup_legacy(opts)
  end
  -- the legacy path needs FileType to fire for buffers already open
  if vim.bo.filetype ~= "" then
    vim.cmd("doautocmd FileType")
  end
end

return M
