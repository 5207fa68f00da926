import { useState } from 'react';
import { QueryClientProvider } from '@tanstack/react-query';
import { registerQueryClient } from '../../lib/client/register';
import { ImportHistory } from './ImportHistory';
import { ImportPanel } from './ImportPanel';
import { RoomsTable } from './RoomsTable';
import { SchoolsEditor } from './SchoolsEditor';
import type { RegisterOptions, RegisterPermissions, SchoolOption } from './types';

type Tab = 'rooms' | 'schools' | 'import' | 'history';

/** The register page: the rooms table, the import (for those who may import) and the import history. */
export default function RegisterApp(props: {
  schools: SchoolOption[];
  options: RegisterOptions;
  can: RegisterPermissions;
}) {
  const [tab, setTab] = useState<Tab>('rooms');
  const tabs: [Tab, string][] = [
    ['rooms', 'Rooms'],
    ['schools', 'Schools and blocks'],
    ...(props.can.canImport ? [['import', 'Import a register'] as [Tab, string]] : []),
    ['history', 'Import history'],
  ];
  return (
    <QueryClientProvider client={registerQueryClient()}>
      <div role="tablist" aria-label="Register" className="flex gap-1 border-b border-line">
        {tabs.map(([id, text]) => (
          <button
            key={id}
            role="tab"
            type="button"
            aria-selected={tab === id}
            aria-controls={`panel-${id}`}
            id={`tab-${id}`}
            className={`-mb-px rounded-t-control border px-4 py-2 text-sm font-semibold ${tab === id ? 'border-line border-b-surface bg-surface text-ink' : 'border-transparent text-ink-muted hover:text-ink'}`}
            onClick={() => setTab(id)}
          >
            {text}
          </button>
        ))}
      </div>
      <div role="tabpanel" id={`panel-${tab}`} aria-labelledby={`tab-${tab}`} className="pt-4">
        {tab === 'rooms' && <RoomsTable schools={props.schools} options={props.options} can={props.can} />}
        {tab === 'schools' && <SchoolsEditor schools={props.schools} options={props.options} can={props.can} />}
        {tab === 'import' && <ImportPanel options={props.options} />}
        {tab === 'history' && <ImportHistory />}
      </div>
    </QueryClientProvider>
  );
}
