/**
 * The phone measure's figures (scripts/lib/benchPhone.ts): medians and spreads of the runs, the
 * targets' verdicts, the JavaScript a load took over the network and uncompressed, where a load's
 * time went, and the printed summary.
 */
import {
  formatPhone,
  isScript,
  kib,
  median,
  medianPhases,
  medianScripts,
  PHONE,
  phasesOf,
  secondsAt,
  spread,
  tallyScripts,
  TARGETS,
  verdict,
  type PhoneFigures,
  type ResourceEntry,
  type ScriptResponse,
} from '../../scripts/lib/benchPhone';

describe('median and spread', () => {
  it('median of an odd count is the middle value, of an even count the mean of the middle two', () => {
    expect(median([3000, 1000, 2000])).toBe(2000);
    expect(median([4, 1, 3, 2])).toBe(2.5);
    expect(median([7])).toBe(7);
  });

  it('no runs: NaN, not 0', () => {
    expect(median([])).toBeNaN();
    expect(spread([]).max).toBeNaN();
  });

  it('keeps the runs in their order, with median and max', () => {
    expect(spread([900, 2500, 1200])).toEqual({ runs: [900, 2500, 1200], median: 1200, max: 2500 });
  });
});

describe('targets', () => {
  it('met when every run is under the target', () => {
    expect(verdict(spread([800, 900, 950]), TARGETS.warmMs)).toBe('met');
  });

  it('the median under the target and the slowest run not: met at the median only', () => {
    expect(verdict(spread([800, 900, 1000]), TARGETS.warmMs)).toBe('median only');
    expect(verdict(spread([800, 900, 4000]), TARGETS.coldMs)).toBe('median only');
  });

  it('the median at or over the target, or no runs: not met', () => {
    expect(verdict(spread([1000, 1000, 1200]), TARGETS.warmMs)).toBe('not met');
    expect(verdict(spread([]), TARGETS.coldMs)).toBe('not met');
  });
});

describe('KiB and transfer time', () => {
  it('KiB with one decimal', () => {
    expect(kib(1024)).toBe('1.0');
    expect(kib(745_243)).toBe('727.8');
    expect(kib(NaN)).toBe('-');
  });

  it('1 MB at 1.6 Mbit/s takes 5 s', () => {
    expect(secondsAt(1_000_000, 1600)).toBe(5);
  });
});

const response = (over: Partial<ScriptResponse>): ScriptResponse => ({
  url: 'http://h/_expo/static/js/web/entry-abc.js',
  type: 'Script',
  mimeType: 'application/javascript',
  fromServiceWorker: false,
  fromCache: false,
  encodedDataLength: 1000,
  ...over,
});

describe('JavaScript of a load', () => {
  const raw: Record<string, number> = { 'http://h/_expo/static/js/web/entry-abc.js': 4000, 'http://h/_expo/static/js/web/index-def.js': 400 };
  const sizeOf = (url: string) => raw[url] ?? NaN;

  it('scripts by resource type or by MIME type; the API, fonts and the page are not', () => {
    expect(isScript({ type: 'Script', mimeType: 'text/plain' })).toBe(true);
    expect(isScript({ type: 'Other', mimeType: 'text/javascript; charset=utf-8' })).toBe(true);
    expect(isScript({ type: 'Fetch', mimeType: 'application/json' })).toBe(false);
    expect(isScript({ type: 'Document', mimeType: 'text/html' })).toBe(false);
  });

  it('sums the transfer of what came over the network and the uncompressed size of every script', () => {
    const t = tallyScripts(
      [
        response({}),
        response({ url: 'http://h/_expo/static/js/web/index-def.js', encodedDataLength: 150 }),
        response({ url: 'http://h/api/session', type: 'Fetch', mimeType: 'application/json', encodedDataLength: 9999 }),
      ],
      sizeOf,
    );
    expect(t).toEqual({ files: 2, fromNetwork: 2, transferBytes: 1150, rawBytes: 4400 });
  });

  it('what the service worker or the HTTP cache answered is no transfer, but still JavaScript the screen needs', () => {
    const t = tallyScripts([response({ fromServiceWorker: true }), response({ url: 'http://h/_expo/static/js/web/index-def.js', fromCache: true })], sizeOf);
    expect(t).toEqual({ files: 2, fromNetwork: 0, transferBytes: 0, rawBytes: 4400 });
  });

  it('a script still loading is not counted', () => {
    expect(tallyScripts([response({ encodedDataLength: null })], sizeOf)).toEqual({ files: 0, fromNetwork: 0, transferBytes: 0, rawBytes: 0 });
  });

  it('the median load by transfer (the lower middle of an even count)', () => {
    const load = (transferBytes: number) => ({ files: 1, fromNetwork: 1, transferBytes, rawBytes: 4000 });
    expect(medianScripts([load(30), load(10), load(20)]).transferBytes).toBe(20);
    expect(medianScripts([load(30), load(10), load(20), load(40)]).transferBytes).toBe(20);
    expect(medianScripts([]).transferBytes).toBeNaN();
  });
});

describe('where a load went', () => {
  const entries: ResourceEntry[] = [
    ['http://h/_expo/static/js/web/entry-abc.js', 'script', 10, 900],
    ['http://h/assets/font.ttf', 'css', 950, 1000],
    ['http://h/api/session', 'fetch', 1200, 1400],
    ['http://h/api/jobs/1/levels?limit=200', 'fetch', 1450, 1700],
    // After the screen was usable: not part of what it waited for.
    ['http://h/api/jobs/1/audits', 'fetch', 1900, 2100],
  ];

  it('last script in, first API request, last API answer before usable', () => {
    expect(phasesOf(entries, 2000)).toEqual({ scriptsMs: 900, firstApiMs: 1200, apiDoneMs: 1700 });
  });

  it('no API answer before usable (data kept on the phone): NaN', () => {
    expect(phasesOf(entries.slice(0, 2), 1000)).toEqual({ scriptsMs: 900, firstApiMs: NaN, apiDoneMs: NaN });
  });

  it('medians per phase', () => {
    expect(medianPhases([
      { scriptsMs: 1, firstApiMs: 10, apiDoneMs: 100 },
      { scriptsMs: 3, firstApiMs: 30, apiDoneMs: 300 },
      { scriptsMs: 2, firstApiMs: 20, apiDoneMs: 200 },
    ])).toEqual({ scriptsMs: 2, firstApiMs: 20, apiDoneMs: 200 });
  });
});

describe('the printed summary', () => {
  const scripts = { files: 1, fromNetwork: 1, transferBytes: 745_243, rawBytes: 3_089_873 };
  const phases = { scriptsMs: 4000, firstApiMs: 6000, apiDoneMs: 7000 };
  const figures: PhoneFigures = {
    conditions: PHONE,
    targets: TARGETS,
    runs: 3,
    screens: [
      {
        screen: 'walk',
        label: 'Level walk',
        path: '/jobs/j/levels/l/walk',
        usableWhen: 'first unit row visible',
        cold: spread([3500, 2900, 3100]),
        warm: spread([700, 800, 900]),
        jsCold: scripts,
        jsWarm: { ...scripts, fromNetwork: 0, transferBytes: 0 },
        coldPhases: phases,
        warmPhases: phases,
      },
    ],
    photo: { width: 4000, height: 3000, pickedBytes: 3_369_920, uploadBytes: 820_338, prepareMs: 2000, uploadMs: 5000 },
    machine: { loadStart: 14.9, loadEnd: 14.28, cores: 2 },
  };

  it('says met or not met per target, with the JavaScript and the photo bytes', () => {
    const text = formatPhone(figures);
    expect(text).toContain('3 runs; load average 14.9 at the start, 14.3 at the end, on 2 cores');
    expect(text).toContain('cold: median 3,100 ms, max 3,500 ms [3500, 2900, 3100] NOT met (target < 3,000 ms)');
    expect(text).toContain('warm: median 800 ms, max 900 ms [700, 800, 900] met (target < 1,000 ms)');
    expect(formatPhone({ ...figures, screens: [{ ...figures.screens[0]!, warm: spread([700, 800, 1100]) }] })).toContain('[700, 800, 1100] met at the median, NOT by the slowest run (target < 1,000 ms)');
    expect(text).toContain('cold 1 file(s), 727.8 KiB compressed over the network (brotli or gzip), 3017.5 KiB raw');
    expect(text).toContain('picked 3290.9 KiB, uploaded 801.1 KiB');
    expect(text).toContain('(24 %)');
  });

  it('a failed photo measure says why', () => {
    expect(formatPhone({ ...figures, photo: null, photoError: 'The finding was not queued on the device.' })).toContain('Photo: not measured (The finding was not queued on the device.)');
  });
});
