/**
 * A JSON document as the tests read it (an output, a figure specification, a schema): its shape is
 * what the expectations check, so its members are read without casts.
 */
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- parsed JSON whose shape the expectations check
export type Json = Record<string, any>;
