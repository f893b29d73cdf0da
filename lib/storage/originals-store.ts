import path from 'node:path';
import { env } from '@/lib/env';
import { LocalStore, type ObjectStore } from './index';

let store: ObjectStore | undefined;

/** The store for original uploaded files, rooted at STORAGE_DIR. */
export function originalsStore(): ObjectStore {
  store ??= new LocalStore(path.resolve(env().STORAGE_DIR));
  return store;
}
