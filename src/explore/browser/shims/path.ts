/** The few POSIX path functions the loader uses, for the page bundle (no node:path in a browser). */
function normalise(parts: string[]): string[] {
  const out: string[] = [];
  for (const p of parts) {
    if (p === '' || p === '.') continue;
    if (p === '..') out.pop();
    else out.push(p);
  }
  return out;
}

export function isAbsolute(p: string): boolean {
  return p.startsWith('/');
}

export function resolve(...paths: string[]): string {
  let parts: string[] = [];
  for (const p of paths) parts = isAbsolute(p) ? p.split('/') : [...parts, ...p.split('/')];
  return `/${normalise(parts).join('/')}`;
}

export function dirname(p: string): string {
  const i = p.replace(/\/+$/, '').lastIndexOf('/');
  return i < 0 ? '.' : i === 0 ? '/' : p.slice(0, i);
}

export function basename(p: string): string {
  const s = p.replace(/\/+$/, '');
  return s.slice(s.lastIndexOf('/') + 1);
}

export function join(...paths: string[]): string {
  return normalise(paths.join('/').split('/')).join('/') || '.';
}

export default { isAbsolute, resolve, dirname, basename, join };
