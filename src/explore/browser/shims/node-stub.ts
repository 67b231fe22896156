/**
 * Node modules the page bundle reaches through code it never runs there (worker threads for mock
 * surveys, the CPU count of plans): each name is present so the bundle links, and throws if called.
 */
const absent = (name: string) => (): never => {
  throw new Error(`${name} is not available in the explore page`);
};
export const Worker = absent('Worker');
export const isMainThread = true;
export const parentPort = null;
export const workerData = undefined;
export const fileURLToPath = absent('fileURLToPath');
export const pathToFileURL = absent('pathToFileURL');
export const availableParallelism = (): number => 1;
export const cpus = (): unknown[] => [];
export const openSync = absent('openSync');
export const closeSync = absent('closeSync');
export const fstatSync = absent('fstatSync');
export const readSync = absent('readSync');
export const readFileSync = absent('readFileSync');
export const constants = {};
export const createHash = absent('createHash');
export default {};
