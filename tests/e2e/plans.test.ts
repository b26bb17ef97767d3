/**
 * Plans and pins in the browser, at phone size (390 × 844) and on a wide screen
 * (1280 × 800): the GC manager uploads a plan on a level of the demo job, opens a finding and
 * places it on the plan by tapping, reloads and still sees the pin (checked in the database
 * too, against where the tap landed), zooms with the buttons and the mouse wheel, and opens the
 * finding from its pin. Screenshots go to .artifacts/screenshots.
 */
import sharp from 'sharp';
import { QueryTypes } from 'sequelize';
import type { Page } from 'playwright-core';
import { Finding, Level } from '../../server/models';
import { seedDemo, DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../server/seed/demo';
import { pageHolds, PHONE, startBrowserHarness, WIDE, type BrowserHarness } from '../support/browser';
import { startFakeS3, type FakeS3 } from '../support/storage';
import { demoJob } from '../support/demo';

jest.setTimeout(300_000);

let h: BrowserHarness;
let s3: FakeS3;
let jobId = '';
let levelId = '';
let findings: { id: string; number: number }[] = [];

const gc = DEMO_ACCOUNTS.find((a) => a.role === 'gc_manager')!;

/** A made-up floor plan: outer walls, a corridor and rooms, drawn as SVG and rendered to PNG. */
function floorPlanPng(): Promise<Buffer> {
  const rooms = [0, 1, 2, 3]
    .map((i) => `<rect x="${60 + i * 370}" y="60" width="370" height="360" fill="none" stroke="#333" stroke-width="6"/>` +
      `<text x="${245 + i * 370}" y="250" font-size="40" text-anchor="middle" font-family="sans-serif" fill="#555">Room ${301 + i}</text>`)
    .join('');
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="1600" height="1000">
    <rect width="1600" height="1000" fill="#fff"/>
    <rect x="40" y="40" width="1520" height="920" fill="none" stroke="#111" stroke-width="14"/>
    ${rooms}
    <rect x="60" y="560" width="1480" height="380" fill="none" stroke="#333" stroke-width="6"/>
    <text x="800" y="500" font-size="36" text-anchor="middle" font-family="sans-serif" fill="#777">Corridor</text>
    <text x="800" y="760" font-size="40" text-anchor="middle" font-family="sans-serif" fill="#555">Open office</text>
  </svg>`;
  return sharp(Buffer.from(svg)).png().toBuffer();
}

beforeAll(async () => {
  s3 = await startFakeS3();
  h = await startBrowserHarness({ objectStore: s3.store });
  await seedDemo(h.db);
  const job = await demoJob();
  jobId = job.id;
  // The demo level with the most open findings; its plan and their pins start empty.
  const [row] = await h.db.sequelize.query<{ level_id: string }>(
    `SELECT level_id FROM findings WHERE job_id = $1 AND status = 'open' GROUP BY level_id ORDER BY count(*) DESC, level_id LIMIT 1`,
    { bind: [jobId], type: QueryTypes.SELECT },
  );
  if (!row) throw new Error('The demo job has no open findings.');
  levelId = row.level_id;
  await Level.update(
    { planKey: null, planContentType: null, planSourceType: null, planWidth: null, planHeight: null, planByteSize: null, planUploadedAt: null, planUploadedBy: null },
    { where: { id: levelId } },
  );
  await Finding.update({ pinX: null, pinY: null }, { where: { levelId } });
  findings = (await Finding.findAll({ where: { levelId, status: 'open' }, order: [['number', 'ASC']], limit: 2 })).map((f) => ({ id: f.id, number: f.number }));
  if (findings.length < 2) throw new Error('The demo level needs two open findings.');
});
afterAll(async () => {
  await h?.close();
  await s3?.close();
});

const signIn = (page: Page, email: string) => h.signIn(page, email, DEMO_PASSWORD);

/** Taps the plan at fractions (fx, fy) of the visible viewport; returns where that is on the page. */
async function tapPlan(page: Page, fx: number, fy: number) {
  const box = (await page.getByTestId('plan-viewport').boundingBox())!;
  const x = box.x + box.width * fx;
  const y = box.y + box.height * fy;
  await page.mouse.click(x, y);
  return { x, y, box };
}

/** Where the plan image is on the page (the tap is checked against it, not against the viewer's own maths). */
async function imageBox(page: Page) {
  return (await page.getByTestId('plan-image').boundingBox())!;
}

async function zoomText(page: Page) {
  return (await page.getByTestId('plan-zoom-level').textContent()) ?? '';
}

describe('plans and pins', () => {
  it('at phone size: the GC manager uploads a plan, places a finding by tapping, reloads and sees it', async () => {
    const { page, problems } = await h.newPage(PHONE);
    await signIn(page, gc.email);
    const planUrl = `${h.baseUrl}/jobs/${jobId}/levels/${levelId}/plan`;
    await page.goto(planUrl);
    await page.getByTestId('plan-empty').waitFor();
    await h.screenshot(page, 'plans-01-empty-phone');

    await page.getByTestId('plan-upload-input').setInputFiles({ name: 'level-plan.png', mimeType: 'image/png', buffer: await floorPlanPng() });
    await page.getByTestId('plan-image').waitFor();
    await page.getByTestId('plan-legend').waitFor();
    expect(await zoomText(page)).toBe('100%');
    const stored = await Level.findByPk(levelId);
    expect([stored!.planWidth, stored!.planHeight, stored!.planContentType]).toEqual([1600, 1000, 'image/png']);
    await h.screenshot(page, 'plans-02-uploaded-phone');

    // From the finding's detail to the plan, in "place" mode.
    const target = findings[0]!;
    await page.goto(`${h.baseUrl}/jobs/${jobId}/findings/${target.id}`);
    await page.getByTestId('finding-plan-link').waitFor();
    await h.screenshot(page, 'plans-03a-finding-phone');
    await page.getByTestId('finding-plan-link').click();
    await page.getByTestId('plan-placing').waitFor();
    await page.getByTestId('plan-image').waitFor();
    await h.screenshot(page, 'plans-03-placing-phone');
    const img = await imageBox(page);
    const tap = await tapPlan(page, 0.3, 0.45);
    await page.getByTestId('plan-placed').waitFor();
    const pin = page.getByTestId(`plan-finding-pin-${target.number}`);
    await pin.waitFor();
    // Independent check: the stored pin is where the tap landed on the drawn image (fractions of its box).
    const row = await Finding.findByPk(target.id);
    expect(row!.pinX).toBeCloseTo((tap.x - img.x) / img.width, 2);
    expect(row!.pinY).toBeCloseTo((tap.y - img.y) / img.height, 2);
    await h.screenshot(page, 'plans-04-placed-phone');

    await page.reload();
    await page.getByTestId(`plan-finding-pin-${target.number}`).waitFor();
    expect(await page.getByTestId('plan-placing').count()).toBe(0);
    // After the reload (no placing banner, so the plan sits higher) the pin's centre is on the same spot of the image.
    const reloadedImg = await imageBox(page);
    const pinBox = (await page.getByTestId(`plan-finding-pin-${target.number}`).boundingBox())!;
    expect(Math.abs(pinBox.x + pinBox.width / 2 - (reloadedImg.x + row!.pinX! * reloadedImg.width))).toBeLessThan(2);
    expect(Math.abs(pinBox.y + pinBox.height / 2 - (reloadedImg.y + row!.pinY! * reloadedImg.height))).toBeLessThan(2);

    // Zoom with the buttons: the pin stays over the same spot of the plan.
    await page.getByTestId('plan-zoom-in').click();
    expect(await zoomText(page)).toBe('150%');
    const zoomedImg = await imageBox(page);
    const zoomedPin = (await page.getByTestId(`plan-finding-pin-${target.number}`).boundingBox())!;
    expect((zoomedPin.x + zoomedPin.width / 2 - zoomedImg.x) / zoomedImg.width).toBeCloseTo(row!.pinX!, 2);
    await h.screenshot(page, 'plans-05-zoomed-phone');
    await page.getByTestId('plan-zoom-fit').click();
    expect(await zoomText(page)).toBe('100%');

    // A tap on the pin opens the finding.
    await page.getByTestId(`plan-finding-pin-${target.number}`).click();
    await page.getByTestId('finding-detail-screen').waitFor();
    expect(page.url()).toContain(`/findings/${target.id}`);
    expect(problems).toEqual([]);
  });

  it('on a wide screen: the plan fits the width, the wheel zooms, and a second finding is placed from the list', async () => {
    const { page, problems } = await h.newPage(WIDE);
    await signIn(page, gc.email);
    await page.goto(`${h.baseUrl}/jobs/${jobId}/levels/${levelId}/plan`);
    await page.getByTestId(`plan-finding-pin-${findings[0]!.number}`).waitFor();
    const viewport = (await page.getByTestId('plan-viewport').boundingBox())!;
    const img = await imageBox(page);
    // Fits the width: the image spans the viewer (borders aside), at the plan's aspect 1600 : 1000.
    expect(Math.abs(img.width - viewport.width)).toBeLessThan(6);
    expect(img.height / img.width).toBeCloseTo(1000 / 1600, 2);
    await h.screenshot(page, 'plans-06-wide');

    const second = findings[1]!;
    await page.getByTestId(`plan-place-finding-${second.number}`).click();
    await page.getByTestId('plan-placing').waitFor();
    const tap = await tapPlan(page, 0.7, 0.7);
    await page.getByTestId('plan-placed').waitFor();
    await page.getByTestId(`plan-finding-pin-${second.number}`).waitFor();
    await page.reload();
    await page.getByTestId(`plan-finding-pin-${second.number}`).waitFor();
    const row = await Finding.findByPk(second.id);
    expect(row!.pinX).toBeCloseTo((tap.x - img.x) / img.width, 2);

    // The wheel zooms at the pointer.
    await page.mouse.move(viewport.x + viewport.width / 2, viewport.y + viewport.height / 2);
    await page.mouse.wheel(0, -400);
    await pageHolds(page, `document.querySelector('[data-testid="plan-zoom-level"]')?.textContent !== '100%'`);
    expect(Number((await zoomText(page)).replace('%', ''))).toBeGreaterThan(100);
    await h.screenshot(page, 'plans-07-wide-zoomed');
    expect(problems).toEqual([]);
  });
});
