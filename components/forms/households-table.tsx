'use client';

import { useMemo, useState } from 'react';
import { DataTable, type Column, type Row } from '@/components/ui/data-table';

export type AddressStatus = 'passed' | 'not_passed' | 'connected';

export interface HouseholdRow extends Row {
  street: string;
  passed: boolean;
  connected: boolean;
}

const COLUMNS: Column[] = [
  { key: 'address', label: 'Address' },
  { key: 'status', label: 'Status', priority: 1 },
  { key: 'units', label: 'Households', align: 'right' },
  { key: 'route', label: 'Serving route' },
  { key: 'side', label: 'Side', priority: 3 },
  { key: 'reason', label: 'Why not passed', priority: 3 },
  { key: 'key', label: 'Key', priority: 3 },
];

/** The register's table with two filters on top of the DataTable's own: status and street. */
export function HouseholdsTable({ rows, streets }: { rows: HouseholdRow[]; streets: string[] }) {
  const [status, setStatus] = useState<'' | AddressStatus>('');
  const [street, setStreet] = useState('');
  const shown = useMemo(
    () =>
      rows.filter(
        (r) =>
          (!street || r.street === street) &&
          (status === '' || (status === 'passed' && r.passed) || (status === 'not_passed' && !r.passed) || (status === 'connected' && r.connected)),
      ),
    [rows, status, street],
  );
  const select = 'min-h-10 w-full rounded-md border border-ink/20 bg-white px-2 text-sm sm:w-auto';
  return (
    <div className="space-y-3">
      <div className="flex flex-wrap gap-3 text-sm">
        <label className="flex w-full flex-col sm:w-auto">
          Status
          <select aria-label="Status" value={status} onChange={(e) => setStatus(e.target.value as '' | AddressStatus)} className={select}>
            <option value="">every status</option>
            <option value="passed">passed</option>
            <option value="not_passed">not passed</option>
            <option value="connected">connected</option>
          </select>
        </label>
        <label className="flex w-full flex-col sm:w-auto">
          Street
          <select aria-label="Street" value={street} onChange={(e) => setStreet(e.target.value)} className={select}>
            <option value="">every street</option>
            {streets.map((s) => (
              <option key={s} value={s}>{s}</option>
            ))}
          </select>
        </label>
      </div>
      <DataTable columns={COLUMNS} rows={shown} label="Addresses" empty={rows.length === 0 ? 'No address in the register.' : 'No address with this status on this street.'} />
    </div>
  );
}
