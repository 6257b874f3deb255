/**
 * The two writes plumbline makes into a workspace, both on request: creating
 * a new workspace (`init`) and appending rows to ledger.csv (`ledger`). A new
 * workspace appears whole or not at all (temp folder, then rename); ledger
 * rows are appended in a single write, never rewriting what is there.
 */
import { closeSync, existsSync, fsyncSync, mkdirSync, openSync, readFileSync, readdirSync, renameSync, rmSync, statSync, writeFileSync, writeSync } from 'node:fs';
import path from 'node:path';

export class WorkspaceRefused extends Error {}

/** Creates `dir` holding `files` (relative path → bytes); refuses a non-empty existing folder. */
export function createWorkspace(dir: string, files: ReadonlyMap<string, Uint8Array>): void {
  const target = path.resolve(dir);
  if (existsSync(target)) {
    if (!statSync(target).isDirectory()) throw new WorkspaceRefused(`${dir} is a file; give a new folder for the workspace`);
    if (readdirSync(target).length > 0) throw new WorkspaceRefused(`${dir} is not empty; init creates a new workspace and never writes over files`);
  }
  mkdirSync(path.dirname(target), { recursive: true });
  const temp = path.join(path.dirname(target), `.${path.basename(target)}.init-${process.pid}`);
  mkdirSync(temp);
  try {
    for (const [name, bytes] of files) {
      mkdirSync(path.dirname(path.join(temp, name)), { recursive: true });
      writeFileSync(path.join(temp, name), bytes);
    }
    if (existsSync(target)) rmSync(target, { recursive: true });
    renameSync(temp, target);
  } catch (e) {
    rmSync(temp, { recursive: true, force: true });
    throw e;
  }
}

/** The text a ledger would have with `lines` appended, in its own line endings; and the bytes to append. */
export function ledgerWithLines(existing: string, lines: readonly string[]): { text: string; append: string } {
  const eol = existing.includes('\r\n') ? '\r\n' : '\n';
  const needsBreak = existing.length > 0 && !existing.endsWith('\n');
  const append = `${needsBreak ? eol : ''}${lines.map((l) => `${l}${eol}`).join('')}`;
  return { text: existing + append, append };
}

/** Appends `bytes` to `file` in one write and flushes it to disk. */
export function appendOnce(file: string, bytes: string): void {
  const fd = openSync(file, 'a');
  try {
    const buf = Buffer.from(bytes, 'utf8');
    let at = 0;
    while (at < buf.length) at += writeSync(fd, buf, at, buf.length - at);
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
}

export function readIfExists(file: string): string | undefined {
  return existsSync(file) ? readFileSync(file, 'utf8') : undefined;
}
