/**
 * The one place skytally reads an input file: the survey YAML, the transmission tables it names,
 * and any tabular or YAML input added later. Every read:
 *
 * - opens without blocking (a FIFO never stalls the program) and checks the open file itself
 *   (no race between a check and the read): it must be a regular file, not a folder, a pipe, a
 *   device or a socket (`/dev/zero` is refused at once instead of being read for ever);
 * - reads at most the stated number of bytes (a file that grows while it is read is still cut off);
 * - refuses binary data (a NUL byte) and text that is not UTF-8;
 * - returns the file's identity (device and inode, links resolved), so that no output may replace
 *   an input (src/cli/io.ts compares outputs with inputs by identity).
 *
 * Every problem is one SurveyError naming the file (and the survey key that named it).
 */
import { closeSync, constants, fstatSync, openSync, readSync, type Stats } from 'node:fs';
import { inputError, type ErrorCode } from '../errors.js';
import {
  MAX_SURVEY_BYTES,
  MAX_TABLE_BYTES,
  type InputFile,
  type InputText,
  type ReadInputOptions,
} from './input-limits.js';

export { MAX_SURVEY_BYTES, MAX_TABLE_BYTES, type InputFile, type InputText, type ReadInputOptions };

/** Strict UTF-8 (invalid bytes throw); one decoder serves every read (a whole-buffer decode keeps no state). */
const UTF8 = new TextDecoder('utf-8', { fatal: true });

function openReason(code: string | undefined): string {
  switch (code) {
    case 'ENOENT':
      return 'does not exist';
    case 'EACCES':
    case 'EPERM':
      return 'cannot be read: permission is denied';
    case 'EISDIR':
      return 'is a folder, not a file';
    case 'ELOOP':
      return 'is a loop of symbolic links';
    case 'ENOTDIR':
      return 'lies under a path that is not a folder';
    case 'ENAMETOOLONG':
      return 'has a name too long for the system';
    default:
      return `cannot be opened (system error ${code ?? 'unknown'})`;
  }
}

function kindOf(st: Stats): string {
  if (st.isDirectory()) return 'a folder';
  if (st.isFIFO()) return 'a pipe (FIFO)';
  if (st.isCharacterDevice() || st.isBlockDevice()) return 'a device';
  if (st.isSocket()) return 'a socket';
  return 'not a regular file';
}

/** Read a whole input file as UTF-8 text, with the checks above. */
export function readInputText(path: string, opts: ReadInputOptions): InputText {
  const fail = (code: ErrorCode, why: string, fix = opts.fix): never => {
    throw inputError(code, opts.file, opts.keyPath, `${opts.subject} ${why}`, fix);
  };
  let fd: number;
  try {
    fd = openSync(path, constants.O_RDONLY | constants.O_NONBLOCK | constants.O_NOCTTY);
  } catch (e) {
    return fail('file_unreadable', openReason((e as { code?: string }).code));
  }
  try {
    const st = fstatSync(fd);
    if (!st.isFile()) {
      const kind = kindOf(st);
      return fail(
        st.isDirectory() ? 'file_unreadable' : 'not_a_file',
        `is ${kind}, not a regular file`,
        'give the path of a file',
      );
    }
    if (st.size > opts.maxBytes) {
      return fail(
        'file_too_large',
        `is ${st.size} bytes, more than the ${opts.maxLabel} allowed`,
        'check that this is the right file',
      );
    }
    // Read at most maxBytes + 1 bytes whatever the size said (files under /proc say 0; a file
    // may grow while it is read). One block, not zero-filled (only the bytes read are copied
    // out of it), reused for every read: a survey of a few hundred bytes needs no 64 KiB of zeros.
    const buf = Buffer.allocUnsafe(Math.min(opts.maxBytes + 1, Math.max(st.size + 1, 64 * 1024)));
    let chunks: Buffer[] = [];
    let total = 0;
    let block = buf;
    for (;;) {
      let n: number;
      try {
        n = readSync(fd, block, 0, block.length, null);
      } catch (e) {
        const code = (e as { code?: string }).code;
        return fail(
          'file_unreadable',
          code === 'EISDIR' ? 'is a folder, not a file' : `cannot be read (system error ${code ?? 'unknown'})`,
        );
      }
      if (n === 0) break;
      chunks.push(Buffer.from(block.subarray(0, n)));
      total += n;
      if (total > opts.maxBytes) {
        return fail(
          'file_too_large',
          `holds more than the ${opts.maxLabel} allowed`,
          'check that this is the right file',
        );
      }
      block = buf.subarray(0, Math.min(buf.length, opts.maxBytes + 1 - total));
    }
    const bytes = Buffer.concat(chunks, total);
    chunks = [];
    if (bytes.includes(0)) return fail('not_text', 'holds binary data (a NUL byte), not text', 'give a text file');
    let text: string;
    try {
      text = UTF8.decode(bytes);
    } catch {
      return fail('not_text', 'is not UTF-8 text', 'save it as UTF-8 text');
    }
    return { path, text: text.replace(/^\uFEFF/, ''), dev: st.dev, ino: st.ino };
  } finally {
    closeSync(fd);
  }
}
