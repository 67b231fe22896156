/**
 * Survey YAML text to plain data, with limits: one document only, unique keys (found in one
 * linear pass: the parser's own check compares every key with every other), at most
 * MAX_ALIAS_COUNT alias expansions (stops "billion laughs" files) and no alias inside the node it
 * names, at most MAX_YAML_NODES keys and list entries nested at most MAX_YAML_DEPTH deep, no
 * custom tags, and only plain values (mappings, lists, strings, finite numbers, booleans, null).
 */
import { isAlias, isMap, isScalar, isSeq, LineCounter, parseDocument, type Document, type Node } from 'yaml';
import { inputError } from '../errors.js';
import { MAX_SURVEY_BYTES } from './read-input.js';

export const MAX_ALIAS_COUNT = 100;
/** Largest survey text parsed, bytes (256 KiB). */
export const MAX_FILE_BYTES = MAX_SURVEY_BYTES;
/** Most keys and list entries (together) a survey file may hold. */
export const MAX_YAML_NODES = 20_000;
/** Deepest nesting of mappings and lists in a survey file. */
export const MAX_YAML_DEPTH = 32;

function firstLine(msg: string): string {
  const line = msg.split('\n')[0] ?? msg;
  const cut = line.replace(/ at line \d+, column \d+:?\s*$/, '').replace(/[.:]\s*$/, '');
  return cut.charAt(0).toLowerCase() + cut.slice(1);
}

/**
 * One walk over the document tree (each node once: aliases are not followed): the first repeated
 * key, a key that is not plain text, an alias inside the node it refers to, and the node and depth
 * limits. Iterative, so that deep nesting cannot exhaust the stack.
 */
function checkTree(doc: Document, lines: LineCounter, file: string): void {
  const where = (node: { range?: [number, number, number?] | null } | null | undefined): string => {
    const at = node?.range?.[0];
    if (at === undefined) return '';
    const pos = lines.linePos(at);
    return ` at line ${pos.line}, column ${pos.col}`;
  };
  interface Item {
    node: unknown;
    path: string;
    depth: number;
    /** The mapping and list nodes this one lies inside (for aliases that refer back to one). */
    ancestors: readonly unknown[];
  }
  const stack: Item[] = [{ node: doc.contents, path: '', depth: 0, ancestors: [] }];
  let count = 0;
  while (stack.length > 0) {
    const { node, path, depth, ancestors } = stack.pop()!;
    if (isAlias(node)) {
      const target = node.resolve(doc);
      if (target && ancestors.includes(target)) {
        throw inputError(
          'yaml_aliases',
          file,
          path,
          `the alias *${node.source}${where(node)} lies inside the node it refers to, which would make it endless`,
          'write the value out instead of the alias',
        );
      }
      continue;
    }
    if (!isMap(node) && !isSeq(node)) continue;
    if (depth >= MAX_YAML_DEPTH) {
      throw inputError(
        'too_large',
        file,
        path,
        `nests mappings and lists more than ${MAX_YAML_DEPTH} levels deep${where(node)}`,
        'a survey file needs only a few levels; check the indentation and brackets',
      );
    }
    count += node.items.length;
    if (count > MAX_YAML_NODES) {
      throw inputError(
        'too_large',
        file,
        '',
        `holds more than ${MAX_YAML_NODES} keys and list entries`,
        'a survey file is a few lines; check that this is the right file',
      );
    }
    const inner = [...ancestors, node];
    if (isMap(node)) {
      const seen = new Set<string>();
      const children: Item[] = [];
      for (const item of node.items) {
        const key = item.key;
        if (
          !isScalar(key) ||
          (typeof key.value !== 'string' &&
            typeof key.value !== 'number' &&
            typeof key.value !== 'boolean' &&
            key.value !== null)
        ) {
          throw inputError(
            'yaml_syntax',
            file,
            path,
            `a key${where(key as Node)} is not plain text`,
            'write each key as a plain word',
          );
        }
        const k = String(key.value);
        const here = path ? `${path}.${k}` : k;
        if (seen.has(k)) {
          throw inputError(
            'yaml_syntax',
            file,
            here,
            `the key is given twice (again${where(key)})`,
            'keep one of the two entries',
          );
        }
        seen.add(k);
        children.push({ node: item.value, path: here, depth: depth + 1, ancestors: inner });
      }
      // Visit in file order: the first problem in the file is the one reported.
      for (let i = children.length - 1; i >= 0; i--) stack.push(children[i]!);
    } else {
      for (let i = node.items.length - 1; i >= 0; i--) {
        stack.push({ node: node.items[i], path: `${path}[${i}]`, depth: depth + 1, ancestors: inner });
      }
    }
  }
}

/** Parse YAML text into plain data. Throws SurveyError yaml_syntax, yaml_aliases, file_too_large, too_large. */
export function parseYaml(text: string, file: string): unknown {
  if (Buffer.byteLength(text, 'utf8') > MAX_FILE_BYTES) {
    throw inputError(
      'file_too_large',
      file,
      '',
      `the text is larger than ${MAX_FILE_BYTES} bytes (256 KiB)`,
      'a survey file is a few lines; check that this is the right file',
    );
  }
  const lines = new LineCounter();
  const doc = parseDocument(text.replace(/^\uFEFF/, ''), {
    uniqueKeys: false,
    prettyErrors: true,
    merge: false,
    lineCounter: lines,
  });
  const err = doc.errors[0];
  if (err) {
    const pos = err.linePos?.[0];
    const where = pos ? ` at line ${pos.line}, column ${pos.col}` : '';
    if (err.code === 'MULTIPLE_DOCS') {
      throw inputError(
        'yaml_syntax',
        file,
        '',
        `holds more than one YAML document (a second one starts${where})`,
        'keep one survey per file and remove the "---" separator',
      );
    }
    throw inputError(
      'yaml_syntax',
      file,
      '',
      `YAML syntax error${where}: ${firstLine(err.message)}`,
      'correct the YAML there (indent with spaces, put ": " between a key and its value)',
    );
  }
  const warn = doc.warnings.find((w) => w.code === 'TAG_RESOLVE_FAILED');
  if (warn) {
    const pos = warn.linePos?.[0];
    throw inputError(
      'yaml_syntax',
      file,
      '',
      `unsupported YAML tag${pos ? ` at line ${pos.line}, column ${pos.col}` : ''}`,
      'remove the "!" tag and write a plain value',
    );
  }
  checkTree(doc, lines, file);
  try {
    return doc.toJS({ maxAliasCount: MAX_ALIAS_COUNT });
  } catch (e) {
    if (e instanceof ReferenceError) {
      const aliasy = /alias/i.test(e.message);
      if (aliasy && /excessive/i.test(e.message)) {
        throw inputError(
          'yaml_aliases',
          file,
          '',
          `the YAML aliases (*name) expand to too much data (more than ${MAX_ALIAS_COUNT} expansions)`,
          'write the values out instead of repeating aliases',
        );
      }
      throw inputError(
        'yaml_syntax',
        file,
        '',
        firstLine(e.message),
        'define each anchor (&name) before its alias (*name)',
      );
    }
    throw e;
  }
}
