/**
 * What the component tests share: a render inside a fresh query client (no retries, nothing
 * collected mid-test), a 400 answer with field messages as the API words it, a job as the API
 * sends it, and an expo-router whose links render their href as a prop (so a test can read where
 * each one goes). Use the router inside a mock factory:
 *   jest.mock('expo-router', () => jest.requireActual('../support/components').linkingRouter());
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { render } from '@testing-library/react-native';
import React, { type ReactElement } from 'react';
import { Text } from 'react-native';
import type { JobDetail } from '../../shared/schemas/setup';

export function renderWithQueries(ui: ReactElement) {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false, gcTime: Infinity }, mutations: { retry: false, gcTime: Infinity } } });
  return render(<QueryClientProvider client={client}>{ui}</QueryClientProvider>);
}

/** A 400 the way the API answers one: the first field's message on top, every field's beside it. */
export function refused(fields: Record<string, string>) {
  return {
    status: 400,
    body: { error: { id: 'validation', message: `${Object.keys(fields)[0]}: ${Object.values(fields)[0]}`, fields } },
  };
}

export const SAMPLE_JOB_ID = '00000000-0000-4000-8000-0000000000a1';

export function sampleJob(overrides: Partial<JobDetail> = {}): JobDetail {
  return {
    id: SAMPLE_JOB_ID,
    name: 'Cinder Lane Commons',
    number: null,
    address: null,
    role: 'gc_manager',
    startsOn: null,
    endsOn: null,
    timeZone: 'UTC',
    unitSystem: 'imperial',
    codeEditions: { IMC: '2018', IRC: '2018', 'NFPA 70': '2023', 'ASHRAE 34': '2019', 'IEC 60335-2-40': '2018' },
    severityDueDays: { critical: 2, major: 7, minor: 14 },
    recurringThresholds: { minUnits: 3, minShare: 0.1 },
    settings: {},
    version: 3,
    ...overrides,
  } as JobDetail;
}

export function linkingRouter() {
  return {
    Link: ({ href, asChild, children, ...rest }: { href: string; asChild?: boolean; children: ReactElement }) =>
      asChild ? React.cloneElement(React.Children.only(children), { href } as object) : React.createElement(Text, { ...rest, href } as object, children),
  };
}
