/** The one use of Node's Buffer the loader makes (src/survey/yaml.ts: a text's size in UTF-8 bytes), for the page bundle. */
const encoder = new TextEncoder();
export const Buffer = {
  byteLength(text: string): number {
    return encoder.encode(text).length;
  },
};
