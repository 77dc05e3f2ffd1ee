// The last step of `npm run package`: lists what went into stillpoint-<version>.vsix, fails if
// anything outside the allowed set was packed (node_modules, the CLI, the benchmark, source maps,
// sources, tests, screenshots) or anything needed is missing (including every file package.json
// points at), and prints the size (limit 3 MB).
// Reads the zip's central directory itself, so it needs no unzip tool.
import { existsSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const pkg = JSON.parse(readFileSync(path.join(root, 'package.json'), 'utf8'));
const vsix = path.join(root, `${pkg.name}-${pkg.version}.vsix`);
/** The largest .vsix we accept (bytes). */
const MAX_VSIX_BYTES = 3 * 1024 * 1024;

/** Every file the .vsix must hold, as vsce names them (it renames the readme, changelog and licence). */
const REQUIRED = [
  '[Content_Types].xml',
  'extension.vsixmanifest',
  'extension/package.json',
  'extension/readme.md',
  'extension/changelog.md',
  'extension/LICENSE.txt',
  'extension/media/icon.png',
  'extension/dist/client.js',
  'extension/dist/server.js',
  'extension/syntaxes/eqnb.tmLanguage.json',
  'extension/syntaxes/language-configuration.json',
];
// The client's "open example" command opens media/example.eqnb from the extension: ship it when it exists.
if (existsSync(path.join(root, 'media/example.eqnb'))) REQUIRED.push('extension/media/example.eqnb');
// Every file package.json points at must be in the .vsix too (else the allow-list in .vscodeignore lacks it).
const contributes = pkg.contributes ?? {};
const referenced = [
  pkg.main,
  pkg.icon,
  ...(contributes.languages ?? []).flatMap((l) => [l.configuration, l.icon?.light, l.icon?.dark]),
  ...(contributes.grammars ?? []).map((g) => g.path),
  ...(contributes.snippets ?? []).map((s) => s.path),
].filter((p) => typeof p === 'string');
for (const p of referenced) {
  const entry = `extension/${path.posix.normalize(p).replace(/^\.\//, '')}`;
  if (!REQUIRED.includes(entry)) REQUIRED.push(entry);
}
/** Anything else is allowed only under these folders. */
const ALLOWED_PREFIXES = ['extension/syntaxes/', 'extension/snippets/', 'extension/media/walkthrough/'];
/** The README's screenshot, shipped so the README shows it inside VS Code too. */
ALLOWED_PREFIXES.push('extension/media/screenshot-hover.png', 'extension/media/chart-example.svg');

/** The file names in a zip archive, from its central directory. */
function zipEntries(buf) {
  const EOCD = 0x06054b50;
  const CENTRAL = 0x02014b50;
  let eocd = -1;
  for (let i = buf.length - 22; i >= Math.max(0, buf.length - 22 - 0xffff); i--) {
    if (buf.readUInt32LE(i) === EOCD) {
      eocd = i;
      break;
    }
  }
  if (eocd < 0) throw new Error('not a zip archive (no end-of-central-directory record)');
  const count = buf.readUInt16LE(eocd + 10);
  let at = buf.readUInt32LE(eocd + 16);
  const names = [];
  for (let k = 0; k < count; k++) {
    if (buf.readUInt32LE(at) !== CENTRAL) throw new Error(`bad central directory entry ${k}`);
    const nameLength = buf.readUInt16LE(at + 28);
    const extraLength = buf.readUInt16LE(at + 30);
    const commentLength = buf.readUInt16LE(at + 32);
    names.push(buf.subarray(at + 46, at + 46 + nameLength).toString('utf8'));
    at += 46 + nameLength + extraLength + commentLength;
  }
  return names;
}

const names = zipEntries(readFileSync(vsix)).filter((n) => !n.endsWith('/'));
const problems = [];
for (const r of REQUIRED) if (!names.includes(r)) problems.push(`missing: ${r}`);
for (const n of names) {
  if (!REQUIRED.includes(n) && !ALLOWED_PREFIXES.some((p) => n.startsWith(p))) problems.push(`not allowed in the .vsix: ${n}`);
}
const size = statSync(vsix).size;
if (size >= MAX_VSIX_BYTES) problems.push(`too large: ${size} bytes (limit ${MAX_VSIX_BYTES})`);

console.log(`${path.basename(vsix)} holds ${names.length} files:`);
for (const n of names.sort()) console.log(`  ${n}`);
if (problems.length) {
  console.error(`check-vsix: FAILED\n  ${problems.join('\n  ')}`);
  process.exit(1);
}
console.log(`${path.basename(vsix)}: ${size} bytes (${(size / 1024).toFixed(1)} KiB; limit 3 MB)`);
