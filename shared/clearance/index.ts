export * from './types';
export * from './status';
export * from './voiding';
export * from './booking';
export * from './preuse';
export * from './checklist';
export * from './validity';
export { freezeSnapshot } from './memo';
export * from './policy-effects';
