/** The rigging calculations: pure TypeScript, SI units, shared by the browser and the server. */
export * from './types';
export * from './apply';
