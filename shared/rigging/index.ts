/** The rigging calculations: pure TypeScript, SI units, shared by the browser and the server. */
export * from './types';
export * from './apply';
export * from './units';
export * from './pipe';
export * from './balance';
export * from './bricks';
export * from './beam';
export * from './plan';
export * from './check';
export * from './correct';
export * from './slack';
export * from './spreader';
