export { writeFileAtomic, syncDir, TEMP_PREFIX } from './atomic.js';
export { loadWalker, saveWalker, WALKER_FORMAT } from './walker-file.js';
export type { WalkerFile } from './walker-file.js';
