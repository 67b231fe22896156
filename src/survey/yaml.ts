/**
 * Survey YAML text to plain data, with limits: one document only, unique keys, at most
 * MAX_ALIAS_COUNT alias expansions (stops "billion laughs" files), no custom tags, and only
 * plain values (mappings, lists, strings, finite numbers, booleans, null).
 */
import { isMap, isScalar, isSeq, parseDocument } from 'yaml';
import { inputError } from '../errors.js';

export const MAX_ALIAS_COUNT = 100;
/** Largest survey file read, bytes (1 MiB). */
export const MAX_FILE_BYTES = 1024 * 1024;

function firstLine(msg: string): string {
  const line = msg.split('\n')[0] ?? msg;
  const cut = line.replace(/ at line \d+, column \d+:?\s*$/, '').replace(/[.:]\s*$/, '');
  return cut.charAt(0).toLowerCase() + cut.slice(1);
}

/** Key path of the first repeated key in the document, walking mappings and lists. */
function duplicatePath(node: unknown, path: string): string | undefined {
  if (isMap(node)) {
    const seen = new Set<string>();
    for (const item of node.items) {
      const k = isScalar(item.key) ? String(item.key.value) : String(item.key);
      const here = path ? `${path}.${k}` : k;
      if (seen.has(k)) return here;
      seen.add(k);
      const inner = duplicatePath(item.value, here);
      if (inner) return inner;
    }
  } else if (isSeq(node)) {
    for (let i = 0; i < node.items.length; i++) {
      const inner = duplicatePath(node.items[i], `${path}[${i}]`);
      if (inner) return inner;
    }
  }
  return undefined;
}

/** Parse YAML text into plain data. Throws SurveyError yaml_syntax, yaml_aliases, file_too_large. */
export function parseYaml(text: string, file: string): unknown {
  if (Buffer.byteLength(text, 'utf8') > MAX_FILE_BYTES) {
    throw inputError('file_too_large', file, '', `the text is larger than ${MAX_FILE_BYTES} bytes (1 MiB)`, 'a survey file is a few lines; check that this is the right file');
  }
  const doc = parseDocument(text.replace(/^\uFEFF/, ''), { uniqueKeys: true, prettyErrors: true, merge: false });
  const err = doc.errors[0];
  if (err) {
    const pos = err.linePos?.[0];
    const where = pos ? ` at line ${pos.line}, column ${pos.col}` : '';
    if (err.code === 'MULTIPLE_DOCS') {
      throw inputError('yaml_syntax', file, '', `holds more than one YAML document (a second one starts${where})`, 'keep one survey per file and remove the "---" separator');
    }
    if (err.code === 'DUPLICATE_KEY') {
      const path = duplicatePath(doc.contents, '') ?? '';
      throw inputError('yaml_syntax', file, path, `the key is given twice (again${where})`, 'keep one of the two entries');
    }
    throw inputError('yaml_syntax', file, '', `YAML syntax error${where}: ${firstLine(err.message)}`, 'correct the YAML there (indent with spaces, put ": " between a key and its value)');
  }
  const warn = doc.warnings.find((w) => w.code === 'TAG_RESOLVE_FAILED');
  if (warn) {
    const pos = warn.linePos?.[0];
    throw inputError('yaml_syntax', file, '', `unsupported YAML tag${pos ? ` at line ${pos.line}, column ${pos.col}` : ''}`, 'remove the "!" tag and write a plain value');
  }
  try {
    return doc.toJS({ maxAliasCount: MAX_ALIAS_COUNT });
  } catch (e) {
    if (e instanceof ReferenceError) {
      const aliasy = /alias/i.test(e.message);
      if (aliasy && /excessive/i.test(e.message)) {
        throw inputError('yaml_aliases', file, '', `the YAML aliases (*name) expand to too much data (more than ${MAX_ALIAS_COUNT} expansions)`, 'write the values out instead of repeating aliases');
      }
      throw inputError('yaml_syntax', file, '', firstLine(e.message), 'define each anchor (&name) before its alias (*name)');
    }
    throw e;
  }
}

