import path from 'node:path';
import { env } from '@/lib/env';
import { LocalStore, type ObjectStore } from './index';

let store: ObjectStore | undefined;

/** The store for generated files (exports, handover packages), rooted at EXPORTS_DIR. */
export function exportsStore(): ObjectStore {
  store ??= new LocalStore(path.resolve(env().EXPORTS_DIR));
  return store;
}
