import { execFileSync } from 'node:child_process';
import { FAULTS_DB, FAULTS_PGPORT, root, sh } from './processes';

/** A cluster of the fault suite's own (its own port and data folder) and a fresh database. */
export default function setup(): () => void {
  sh(['start']);
  sh(['recreatedb', FAULTS_DB]);
  execFileSync('npm', ['run', '--silent', 'db:migrate'], { cwd: root, env: { ...process.env, PGPORT: FAULTS_PGPORT, DATABASE_URL: sh(['url', FAULTS_DB]) }, stdio: 'inherit' });
  // stop what we started
  return () => sh(['stop']);
}
