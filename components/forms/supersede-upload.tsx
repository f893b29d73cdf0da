'use client';

import { useRouter } from 'next/navigation';
import { useRef, useState } from 'react';
import { Button, Notice } from '@/components/ui/primitives';

/** Sends a corrected file that supersedes this upload; the old one stays, marked superseded. */
export function SupersedeUpload({ projectId, uploadId }: { projectId: string; uploadId: string }) {
  const router = useRouter();
  const input = useRef<HTMLInputElement>(null);
  const [state, setState] = useState<{ busy: boolean; progress: number; error: string | null }>({ busy: false, progress: 0, error: null });

  function send(files: File[]) {
    if (files.length === 0) return;
    const form = new FormData();
    form.append('supersedes', uploadId);
    for (const f of files) form.append('file', f, f.name);
    const xhr = new XMLHttpRequest();
    xhr.open('POST', `/api/projects/${projectId}/uploads`);
    xhr.responseType = 'json';
    xhr.upload.onprogress = (e) => setState((s) => ({ ...s, progress: e.total ? e.loaded / e.total : 0 }));
    xhr.onload = () => {
      const body = xhr.response as { upload?: { id: string }; error?: { message: string } } | null;
      if (xhr.status === 201 && body?.upload) router.push(`/projects/${projectId}/uploads/${body.upload.id}`);
      else setState({ busy: false, progress: 0, error: xhr.status === 200 ? 'That file is already in this project; nothing was replaced.' : (body?.error?.message ?? `The server answered ${xhr.status}.`) });
    };
    xhr.onerror = () => setState({ busy: false, progress: 0, error: 'The connection failed. Try again.' });
    setState({ busy: true, progress: 0, error: null });
    xhr.send(form);
  }

  return (
    <div className="flex flex-col items-end gap-2">
      <Button variant="secondary" disabled={state.busy} onClick={() => input.current?.click()}>
        Replace with a corrected file
      </Button>
      <input ref={input} type="file" multiple className="sr-only" aria-label="Corrected file" onChange={(e) => send([...(e.target.files ?? [])])} />
      {state.busy && <progress className="h-2 w-48 accent-brand" max={1} value={state.progress} aria-label="Progress of the corrected file" />}
      {state.error && <Notice tone="bad">{state.error}</Notice>}
    </div>
  );
}
