'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { Button, Notice } from '@/components/ui/primitives';
import { photoPatchSchema } from '@/lib/records/photo-schema';
import type { UnitSystem } from '@/lib/records/units';
import { callApi } from './api-client';
import { PositionFields, RecordForm, TextField, useRecordForm, type RouteOption } from './record-form';

/**
 * Changes a photo's caption or moves it by hand (the phone's position, a position typed, or a route and
 * chainage); the draft stays on the device until the server has it. Removing asks first.
 */
export function PhotoEditForm({ projectId, photo, routes, system }: { projectId: string; photo: { id: string; caption: string; fileName: string }; routes: RouteOption[]; system: UnitSystem }) {
  const router = useRouter();
  const url = `/api/projects/${projectId}/photos/${photo.id}`;
  const rf = useRecordForm({
    schema: photoPatchSchema,
    draftKey: `photo:${projectId}:${photo.id}`,
    defaults: { caption: photo.caption },
    url,
    method: 'PATCH',
    savedText: 'Photo saved.',
  });
  const [removal, setRemoval] = useState<string | null>(null);
  async function remove() {
    if (!window.confirm(`Remove the photo ${photo.fileName}? The original is deleted too.`)) return;
    const res = await callApi(url, 'DELETE');
    if (res.ok) router.refresh();
    else setRemoval(res.message);
  }
  return (
    <div className="flex flex-col gap-3">
      <RecordForm rf={rf} label={`Change photo ${photo.fileName}`} submitLabel="Save photo">
        <TextField rf={rf} name="caption" label="Caption" />
        <PositionFields rf={rf} routes={routes} system={system} />
      </RecordForm>
      <Button type="button" variant="danger" className="min-h-12" onClick={remove}>
        Remove photo
      </Button>
      {removal && <Notice tone="bad">{removal}</Notice>}
    </div>
  );
}
