import { notFound } from 'next/navigation';

// an address inside a project that no page answers: the project's "not found", under its tabs
export default function MissingInProject(): never {
  notFound();
}
