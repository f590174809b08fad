import { Foundation1796170942239 } from './1796170942239-Foundation.js';

/** Every migration class in order; new ones are appended here. */
export const migrations: Function[] = [Foundation1796170942239];
