import path from 'node:path';
import { FAULTS_DB, root, sh } from './processes';

process.env.DATABASE_URL = sh(['url', FAULTS_DB]);
process.env.NEXTAUTH_SECRET ??= 'faults-secret-not-for-production';
process.env.STORAGE_DIR = path.join(root, '.data/faults/storage');
process.env.EXPORTS_DIR = path.join(root, '.data/faults/exports');
process.env.UPLOAD_TMP_DIR = path.join(root, '.data/faults/upload-tmp');
