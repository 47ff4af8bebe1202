// Installs a packed singleshot tarball into an empty folder with npm, offline: `npm ci` from a
// lockfile written here, whose entries (resolved address and integrity of every package) are
// the project's own package-lock.json entries for the package's dependencies, which `npm ci`
// of the project has just put into npm's cache. So the install needs no network, and installs
// exactly the dependency versions the project was tested with. The consumer also depends on
// apache-arrow (to read the tables), and has TypeScript and Node's types as development
// dependencies, to typecheck against the shipped types.
//
//   node test/package/install-tarball.mjs TARBALL FOLDER
import { createHash } from 'node:crypto';
import { execFileSync } from 'node:child_process';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const [tarballArg, folderArg] = process.argv.slice(2);
if (!tarballArg || !folderArg) {
  process.stderr.write('usage: install-tarball.mjs TARBALL FOLDER\n');
  process.exit(2);
}
const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const tarball = resolve(tarballArg);
const folder = resolve(folderArg);
const project = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8'));
const lock = JSON.parse(readFileSync(join(root, 'package-lock.json'), 'utf8'));

/** Where Node finds `name` from the package at `from` (a lockfile location): the nearest node_modules up the tree. */
function locate(name, from) {
  for (let at = from; ; at = at.includes('/node_modules/') ? at.slice(0, at.lastIndexOf('/node_modules/')) : '') {
    const here = at === '' ? `node_modules/${name}` : `${at}/node_modules/${name}`;
    if (lock.packages[here]) return here;
    if (at === '') throw new Error(`${name} (needed by ${from || 'the project'}) is not in package-lock.json`);
  }
}

/** Every lockfile location the named packages need, with their dependencies'. */
function closure(names) {
  const out = new Set();
  const visit = (name, from) => {
    const at = locate(name, from);
    if (out.has(at)) return;
    out.add(at);
    const entry = lock.packages[at];
    for (const dep of Object.keys({ ...entry.dependencies, ...entry.optionalDependencies })) {
      try {
        visit(dep, at);
      } catch (e) {
        if (!(entry.optionalDependencies && dep in entry.optionalDependencies)) throw e;
      }
    }
  };
  for (const n of names) visit(n, '');
  return out;
}

const runtime = closure(Object.keys(project.dependencies));
const tools = { typescript: project.devDependencies.typescript, '@types/node': project.devDependencies['@types/node'] };
const toolLocations = closure(Object.keys(tools));

mkdirSync(folder, { recursive: true });
const spec = `file:${relative(folder, tarball)}`;
const manifest = {
  name: 'singleshot-consumer', version: '1.0.0', private: true, type: 'module',
  dependencies: { 'apache-arrow': project.dependencies['apache-arrow'], singleshot: spec }, devDependencies: tools,
};
const packages = {
  '': { name: manifest.name, version: manifest.version, dependencies: manifest.dependencies, devDependencies: tools },
  'node_modules/singleshot': {
    version: project.version,
    resolved: spec,
    integrity: `sha512-${createHash('sha512').update(readFileSync(tarball)).digest('base64')}`,
    license: project.license,
    dependencies: project.dependencies,
    bin: project.bin,
    engines: project.engines,
  },
};
for (const at of [...runtime, ...toolLocations]) {
  const { dev, devOptional, peer, ...entry } = lock.packages[at];
  packages[at] = runtime.has(at) ? entry : { ...entry, dev: true };
}
writeFileSync(join(folder, 'package.json'), JSON.stringify(manifest, null, 2) + '\n');
writeFileSync(join(folder, 'package-lock.json'), JSON.stringify({ name: manifest.name, version: manifest.version, lockfileVersion: 3, requires: true, packages }, null, 2) + '\n');
execFileSync('npm', ['ci', '--offline', '--no-audit', '--no-fund', '--ignore-scripts'], { cwd: folder, stdio: 'inherit' });
