-- Neovim (0.7+, headless) end-to-end check of the Spinwright language server through Neovim's own
-- LSP client: open a .spw file, wait for the pushed diagnostics, hover the field and require the
-- Zeeman energy g muB B in meV. Run by tests/editor/neovim.sh:
--   SPW_SERVER=dist/server.js nvim --headless --clean -c "luafile tests/editor/neovim.lua" FILE
local t0 = vim.loop.hrtime()
local function ms() return (vim.loop.hrtime() - t0) / 1e6 end
local function out(s) io.stdout:write(s .. "\n") end
local function finish(code) vim.schedule(function() vim.cmd((code == 0) and "qa!" or ("cq " .. code)) end) end
local timer = vim.defer_fn(function() out("TIMEOUT after " .. math.floor(ms()) .. " ms"); finish(2) end, 20000)

local server = vim.env.SPW_SERVER or (vim.fn.getcwd() .. "/dist/server.js")
local bufnr = vim.api.nvim_get_current_buf()
local lines = vim.api.nvim_buf_get_lines(bufnr, 0, -1, false)

-- Where the field statement is, and the Zeeman energy to expect for an isotropic g:
-- E_Z = g muB B with muB = 5.788381806e-2 meV/T (CODATA 2018, Tiesinga et al., 2021).
local field_line, field_col, field_t, g_value = nil, nil, nil, 2.0
for i, l in ipairs(lines) do
  local c = l:find("^%s*field%s")
  if c and not field_line then
    field_line, field_col = i - 1, l:find("field") - 1
    field_t = tonumber(l:match("field%s+([%d%.]+)%s*T%f[%W]"))
  end
  local g = l:match("^%s*g%s+[%w_]+%s*=%s*([%d%.]+)%s*$")
  if g then g_value = tonumber(g) end
end
if not field_line then out("no field statement in the file"); finish(3) return end
local expected = field_t and string.format("%.5g meV", g_value * 5.788381806e-2 * field_t) or nil

local hovered = false
local function hover(client)
  if hovered then return end
  hovered = true
  local params = { textDocument = { uri = vim.uri_from_bufnr(bufnr) }, position = { line = field_line, character = field_col + 1 } }
  client.request("textDocument/hover", params, function(err, result)
    if err then out("HOVER ERROR " .. vim.inspect(err)); finish(1) return end
    local value = result and result.contents and (result.contents.value or vim.inspect(result.contents)) or ""
    out("HOVER: " .. value:gsub("\n+", " | "))
    out(string.format("hover answered after %.0f ms", ms()))
    timer:stop()
    local ok = value:find("Zeeman energy", 1, true) ~= nil and (expected == nil or value:find(expected, 1, true) ~= nil)
    if not ok then out("expected the Zeeman energy" .. (expected and (" " .. expected) or "") .. " in the hover") end
    client.stop()
    finish(ok and 0 or 1)
  end, bufnr)
end

local client_id
local default_publish = vim.lsp.handlers["textDocument/publishDiagnostics"]
vim.lsp.handlers["textDocument/publishDiagnostics"] = function(err, result, ctx, config)
  default_publish(err, result, ctx, config)
  if result and result.uri == vim.uri_from_bufnr(bufnr) then
    local codes = {}
    for _, d in ipairs(result.diagnostics or {}) do table.insert(codes, tostring(d.code)) end
    out(string.format("DIAGNOSTICS after %.0f ms: %d [%s]", ms(), #codes, table.concat(codes, ", ")))
    local client = vim.lsp.get_client_by_id(client_id)
    if client then hover(client) end
  end
end

client_id = vim.lsp.start_client({
  name = "spinwright",
  cmd = { "node", server, "--stdio" },
  root_dir = vim.fn.getcwd(),
  on_init = function() out(string.format("initialized after %.0f ms", ms())) end,
})
if not client_id then out("start_client failed"); finish(3) return end
vim.lsp.buf_attach_client(bufnr, client_id)
