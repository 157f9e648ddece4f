/** The tool's version, as every figure file states it (one reader, in io/). */
export { toolVersion } from '../io/version.js';
