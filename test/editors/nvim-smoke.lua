-- Headless Neovim (0.7) as a second, independent LSP client of the bundled Stillpoint server.
-- Run by test/editors/run-nvim.mjs, which sets the environment and keeps the artifacts:
--   nvim --headless -u NONE -i NONE -n -c "luafile test/editors/nvim-smoke.lua"
-- Env: STILLPOINT_NODE (node binary), STILLPOINT_SERVER (dist/server.js), STILLPOINT_FILE (a copy of
-- examples/with-mistakes/step4-draft.eqnb), STILLPOINT_SERVER_STDERR (file for the server's stderr),
-- STILLPOINT_TIMEOUT_MS, STILLPOINT_EXPECT_FORMATTING ("0": formatting is known to be missing).
-- Prints one JSON object on stdout (steps with ok/detail); exits 0 only if every step passed.
local t0 = vim.loop.hrtime()
local function ms() return math.floor((vim.loop.hrtime() - t0) / 1e6) end

local node = os.getenv('STILLPOINT_NODE') or 'node'
local server = assert(os.getenv('STILLPOINT_SERVER'), 'STILLPOINT_SERVER is not set')
local file = assert(os.getenv('STILLPOINT_FILE'), 'STILLPOINT_FILE is not set')
local stderr_path = os.getenv('STILLPOINT_SERVER_STDERR') or '/dev/null'
local timeout = tonumber(os.getenv('STILLPOINT_TIMEOUT_MS') or '15000')
local expect_formatting = os.getenv('STILLPOINT_EXPECT_FORMATTING') ~= '0'

-- The unbalanced equation (0-based line 12 = line 13 of the file) and what the preferred fix makes of it.
local UNBALANCED_LINE = 12
local BALANCED = 'combust: C3H8(g) + 5 O2(g) -> 3 CO2(g) + 4 H2O(g)'
local FORMATTING_MISSING = 'formatting not implemented yet (issue 4)'

vim.lsp.set_log_level('debug')
local v = vim.version()
local result = {
  ok = false,
  nvim = v.major .. '.' .. v.minor .. '.' .. v.patch,
  lsp_log = vim.lsp.get_log_path(),
  steps = {},
}

local function finish()
  result.elapsed_ms = ms()
  io.stdout:write(vim.fn.json_encode(result) .. '\n')
  io.stdout:flush()
  if result.ok then vim.cmd('qall!') else vim.cmd('cquit!') end
end

-- Runs one named step; a step fails by raising an error with its message. Later steps still run
-- unless the step is fatal (nothing after it can work).
local function step(name, fatal, fn)
  local started = ms()
  local ok, detail = pcall(fn)
  -- error() prefixes "file:line: "; the step's name already says where
  if not ok then detail = tostring(detail):gsub('^[^:]*:%d+: ', '') end
  table.insert(result.steps, { name = name, ok = ok, detail = detail, ms = ms() - started })
  if not ok and fatal then error('fatal step failed: ' .. name, 0) end
  return ok
end

local function has_code(diagnostics, code)
  for _, d in ipairs(diagnostics or {}) do
    if d.code == code then return d end
  end
  return nil
end

local main_ok, main_err = pcall(function()
  local published = nil   -- the latest textDocument/publishDiagnostics params for our file
  local publish_count = 0
  local exited = nil
  local client_id, client, bufnr, uri

  step('server starts and initializes', true, function()
    client_id = vim.lsp.start_client({
      name = 'stillpoint',
      -- via sh, so that the server's stderr goes to its own artifact file
      cmd = { '/bin/sh', '-c', 'exec "$0" "$1" --stdio 2>"$2"', node, server, stderr_path },
      root_dir = vim.fn.fnamemodify(file, ':p:h'),
      handlers = {
        ['textDocument/publishDiagnostics'] = function(err, params, ctx, config)
          if params and params.uri == uri then
            published = params
            publish_count = publish_count + 1
          end
          return vim.lsp.handlers['textDocument/publishDiagnostics'](err, params, ctx, config)
        end,
      },
      on_exit = function(code, signal) exited = { code = code, signal = signal } end,
    })
    if not client_id then error('vim.lsp.start_client returned nil') end
    vim.cmd('edit ' .. vim.fn.fnameescape(file))
    bufnr = vim.api.nvim_get_current_buf()
    uri = vim.uri_from_bufnr(bufnr)
    vim.bo[bufnr].filetype = 'eqnb'
    if not vim.lsp.buf_attach_client(bufnr, client_id) then error('buf_attach_client failed') end
    local ready = vim.wait(timeout, function()
      local c = vim.lsp.get_client_by_id(client_id)
      return exited ~= nil or (c ~= nil and c.initialized == true)
    end, 20)
    if exited then
      error(string.format('the server exited during start-up (code %s, signal %s); see its stderr', tostring(exited.code), tostring(exited.signal)))
    end
    if not ready then error('the server did not answer initialize within ' .. timeout .. ' ms') end
    client = vim.lsp.get_client_by_id(client_id)
    result.server_capabilities = client.server_capabilities
    return 'initialized after ' .. ms() .. ' ms'
  end)

  step('diagnostics arrive, including unbalanced-elements', false, function()
    local got = vim.wait(timeout, function() return has_code(published and published.diagnostics, 'unbalanced-elements') ~= nil end, 20)
    result.diagnostics = {}
    for _, d in ipairs(published and published.diagnostics or {}) do
      table.insert(result.diagnostics, { line = d.range.start.line + 1, character = d.range.start.character, code = d.code, severity = d.severity, message = d.message })
    end
    if not got then error('no unbalanced-elements diagnostic within ' .. timeout .. ' ms (published: ' .. vim.inspect(result.diagnostics) .. ')') end
    local d = has_code(published.diagnostics, 'unbalanced-elements')
    if d.range.start.line ~= UNBALANCED_LINE then error('unbalanced-elements is on line ' .. (d.range.start.line + 1) .. ', expected line 13') end
    -- Neovim's own diagnostic store has them too (what the user sees)
    if #vim.diagnostic.get(bufnr) == 0 then error('vim.diagnostic.get() is empty') end
    return #published.diagnostics .. ' diagnostics'
  end)

  step('hover on the reaction label returns Markdown', false, function()
    local params = { textDocument = { uri = uri }, position = { line = UNBALANCED_LINE, character = 3 } }
    local r = client.request_sync('textDocument/hover', params, timeout, bufnr)
    if not r then error('hover timed out') end
    if r.err then error('hover error: ' .. vim.inspect(r.err)) end
    local contents = r.result and r.result.contents
    result.hover = contents
    if type(contents) ~= 'table' or contents.kind ~= 'markdown' then error('hover is not MarkupContent of kind markdown: ' .. vim.inspect(contents)) end
    if not contents.value:find('combust', 1, true) then error('hover Markdown does not name the reaction `combust`') end
    return #contents.value .. ' characters of Markdown'
  end)

  step('quick fix balances the equation', false, function()
    local d = has_code(published and published.diagnostics, 'unbalanced-elements')
    if not d then error('no unbalanced-elements diagnostic to fix') end
    local params = {
      textDocument = { uri = uri },
      range = d.range,
      context = { diagnostics = { d }, only = { 'quickfix' } },
    }
    local r = client.request_sync('textDocument/codeAction', params, timeout, bufnr)
    if not r then error('codeAction timed out') end
    if r.err then error('codeAction error: ' .. vim.inspect(r.err)) end
    local titles = {}
    local preferred = nil
    for _, a in ipairs(r.result or {}) do
      table.insert(titles, a.title)
      if a.isPreferred and a.title:sub(1, 9) == 'Balance: ' then preferred = a end
    end
    result.code_actions = titles
    if not preferred then error('no preferred "Balance: ..." action among ' .. vim.inspect(titles)) end
    if not preferred.edit then error('the balance action has no edit') end
    vim.lsp.util.apply_workspace_edit(preferred.edit, client.offset_encoding)
    local line = vim.api.nvim_buf_get_lines(bufnr, UNBALANCED_LINE, UNBALANCED_LINE + 1, false)[1]
    result.fixed_line = line
    local code_part = (line:gsub('%s*#.*$', ''))
    if code_part ~= BALANCED then error('after the fix, line 13 reads "' .. code_part .. '", expected "' .. BALANCED .. '"') end
    return preferred.title
  end)

  step('after the fix the unbalanced-elements diagnostic is gone', false, function()
    local before = publish_count
    local gone = vim.wait(timeout, function()
      return publish_count > before and not has_code(published.diagnostics, 'unbalanced-elements')
    end, 20)
    if not gone then error('unbalanced-elements was still published ' .. timeout .. ' ms after the fix') end
    return 'republished with ' .. #published.diagnostics .. ' diagnostics'
  end)

  step('formatting (textDocument/formatting)', false, function()
    local advertised = client.server_capabilities.documentFormattingProvider and true or false
    -- sent even when not advertised (client.request_sync does not check capabilities), to record the answer
    local params = { textDocument = { uri = uri }, options = { tabSize = 2, insertSpaces = true } }
    local r = client.request_sync('textDocument/formatting', params, timeout, bufnr)
    local supported = advertised and r ~= nil and r.err == nil
    result.formatting = {
      advertised = advertised,
      supported = supported,
      error = r and r.err and { code = r.err.code, message = r.err.message } or nil,
      edits = r and r.result and #r.result or nil,
      expected = expect_formatting,
    }
    if expect_formatting and not supported then error(FORMATTING_MISSING) end
    if not expect_formatting and supported then
      error('formatting is supported now: remove STILLPOINT_EXPECT_FORMATTING=0 from .ci/run (issue 4)')
    end
    if supported then
      -- a formatter changes layout only, and formatting its own output changes nothing
      local function squeezed()
        return (table.concat(vim.api.nvim_buf_get_lines(bufnr, 0, -1, false), '\n'):gsub('%s+', ''))
      end
      local before = squeezed()
      vim.lsp.util.apply_text_edits(r.result or {}, bufnr, client.offset_encoding)
      if squeezed() ~= before then error('formatting changed more than whitespace') end
      local again = client.request_sync('textDocument/formatting', params, timeout, bufnr)
      if not again or again.err then error('the second formatting request failed: ' .. vim.inspect(again and again.err)) end
      if again.result and #again.result > 0 then
        error('formatting is not idempotent: a second request returned ' .. #again.result .. ' edits, e.g. ' .. vim.inspect(again.result[1]))
      end
      return 'supported: ' .. tostring(result.formatting.edits) .. ' edits, whitespace only, idempotent'
    end
    return 'not supported (allowed by STILLPOINT_EXPECT_FORMATTING=0): ' .. vim.inspect(result.formatting.error)
  end)

  step('server shuts down cleanly', false, function()
    vim.lsp.stop_client(client_id)
    local stopped = vim.wait(5000, function() return exited ~= nil end, 20)
    if not stopped then error('the server did not exit within 5 s of shutdown/exit') end
    if exited.code ~= 0 then error('the server exited with code ' .. tostring(exited.code)) end
    return 'exit code 0'
  end)
end)

if not main_ok then table.insert(result.steps, { name = '(run stopped)', ok = false, detail = tostring(main_err) }) end
result.ok = main_ok
for _, s in ipairs(result.steps) do
  if not s.ok then result.ok = false end
end
finish()
