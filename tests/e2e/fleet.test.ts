import type { Browser } from 'playwright-core';
import { BASE_URL, launchBrowser, newPage, PHONE, screenshot, signIn, waitUntil, WIDE } from '../helpers/browser';
import { apiGet, apiToken, programId } from '../helpers/api';
import type { AssetList } from '../../shared/schemas/assets';

let browser: Browser;
let coordinatorToken: string;
let program: string;
type Booking = { id: string; assetId: string; assetTag: string; odometerKm: number };
/** One booking for the driver's journey at each width, on different vehicles. */
const bookings: Booking[] = [];

const HOUR = 3600_000;
/** The booking form's default window: from the next full hour, four hours long. */
function defaultWindow() {
  const from = new Date();
  from.setMinutes(0, 0, 0);
  return { startsAt: new Date(from.getTime() + HOUR).toISOString(), endsAt: new Date(from.getTime() + 5 * HOUR).toISOString() };
}

beforeAll(async () => {
  browser = await launchBrowser();
  coordinatorToken = await apiToken('coordinator@fenwater.example');
  program = await programId(coordinatorToken, 'FW3');
  const drivers = await apiGet<{ items?: Array<{ userId: string; email: string }>; drivers?: Array<{ userId: string; email: string }> }>(
    coordinatorToken,
    `/api/drivers?programId=${program}`,
  );
  const driver = (drivers.items ?? drivers.drivers ?? []).find((d) => d.email === 'driver@fenwater.example')!;
  const vehicles = await apiGet<AssetList>(coordinatorToken, `/api/assets?programId=${program}&kind=vehicle&status=available&limit=100`);
  // Book the demo driver twice (one journey per width) on the first vehicles and windows the rules
  // allow (cleared, free, a stage within the driver's level, the driver free too); each window
  // starts within the 12 hours in which check-out opens. The second cannot overlap the first:
  // the server refuses a driver booked twice at once, and the search moves on an hour.
  const refusals: string[] = [];
  const nextHour = new Date();
  nextHour.setMinutes(0, 0, 0);
  search: for (let k = 1; k <= 11; k += 1) {
    for (const vehicle of vehicles.items) {
      if (bookings.some((b) => b.assetId === vehicle.id)) continue;
      const startsAt = new Date(nextHour.getTime() + k * HOUR).toISOString();
      const endsAt = new Date(nextHour.getTime() + (k + 2) * HOUR).toISOString();
      const res = await fetch(`${BASE_URL}/api/assignments`, {
        method: 'POST',
        headers: { authorization: `Bearer ${coordinatorToken}`, 'content-type': 'application/json' },
        body: JSON.stringify({ programId: program, assetId: vehicle.id, driverId: driver.userId, purpose: 'ride-handling', notes: 'Browser test drive', startsAt, endsAt }),
      });
      if (res.status === 201) {
        const body = (await res.json()) as { id: string };
        bookings.push({ id: body.id, assetId: vehicle.id, assetTag: vehicle.tag, odometerKm: vehicle.odometerKm });
        if (bookings.length === 2) break search;
        continue search;
      }
      refusals.push(`${vehicle.tag}: ${res.status} ${(await res.text()).slice(0, 200)}`);
    }
  }
  if (bookings.length < 2) throw new Error(`the demo driver could not be booked twice (${vehicles.items.length} vehicles): ${refusals.join(' | ').slice(0, 1500)}`);
});
afterAll(async () => {
  await browser?.close();
});

/** A date as the plan's `start` and `day` parameters take it: the browser's (and this machine's) local calendar day. */
function localDay(iso: string): string {
  const d = new Date(iso);
  return `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, '0')}-${String(d.getDate()).padStart(2, '0')}`;
}

describe.each([
  ['wide', WIDE],
  ['phone', PHONE],
] as const)('coordinator at %s width', (label, viewport) => {
  it('when a coordinator books a vehicle that is already booked in that window, then the refusal lists the reason; a proposal they accept then shows on the plan', async () => {
    const page = await newPage(browser, viewport);
    // A vehicle already booked in the window the form proposes (from the next full hour, four hours).
    const window = defaultWindow();
    const planned = await apiGet<{ items: Array<{ assetId: string; startsAt: string; endsAt: string; status: string }> }>(
      coordinatorToken,
      `/api/assignments?programId=${program}&from=${encodeURIComponent(window.startsAt)}&to=${encodeURIComponent(window.endsAt)}`,
    );
    const busy = planned.items.find((a) => a.status !== 'cancelled' && a.startsAt < window.endsAt && a.endsAt > window.startsAt);
    expect(busy).toBeDefined();
    await signIn(page, 'coordinator@fenwater.example', 'proofyard-demo', `/fleet/new?assetId=${busy!.assetId}`);
    await page.getByTestId('fleet-book').waitFor();
    const driverOptions = page.locator('[data-testid^="book-driver-"]');
    await waitUntil('drivers are offered', async () => (await driverOptions.count()) > 1);
    const ids = await driverOptions.evaluateAll((els) => els.map((e) => e.getAttribute('data-testid')!));
    const other = ids.find((id) => /^book-driver-[0-9a-f-]{36}$/.test(id))!;
    await page.getByTestId(other).click();
    await page.getByTestId('book-purpose-durability-route').click();
    await page.getByTestId('book-submit').click();
    const refusal = page.getByTestId('book-refusal-panel');
    await refusal.waitFor();
    await expect(refusal.textContent()).resolves.toMatch(/already|booked|overlap/i);
    await screenshot(page, `coordinator-booking-refused-${label}`);

    // Then a proposal: two requests for the same window (tomorrow, the form's default), matched
    // to eligible drivers and vehicles; nothing is booked until the coordinator accepts.
    await page.getByTestId('fleet-section-proposals').click();
    await page.getByTestId('fleet-proposals').waitFor();
    await page.getByTestId('proposal-request-add').click();
    await page.getByTestId('proposal-request-1').waitFor();
    await page.getByTestId('proposal-run').click();
    await page.getByTestId('proposal-result').waitFor();
    await page.getByTestId('proposal-pair-0').waitFor();
    const pairs = await page.locator('[data-testid^="proposal-pair-"][data-testid$="-choose"]').count();
    expect(pairs).toBeGreaterThanOrEqual(1);
    await page.getByTestId('proposal-accept').click();
    const accepted = page.getByTestId('proposal-accepted');
    await accepted.waitFor();
    await expect(accepted.textContent()).resolves.toMatch(/Booked (1 assignment|\d+ assignments)/);
    const booked = await accepted
      .locator('a[href^="/fleet/assignments/"]')
      .evaluateAll((links) => links.map((a) => a.getAttribute('href')!.split('/').pop()!));
    expect(booked).toHaveLength(pairs);
    await screenshot(page, `coordinator-proposal-accepted-${label}`);

    // The bookings are real: the plan of their day shows each of them.
    const first = await apiGet<{ startsAt: string; status: string }>(coordinatorToken, `/api/assignments/${booked[0]}`);
    expect(first.status).toBe('planned');
    const day = localDay(first.startsAt);
    await page.goto(`${BASE_URL}/fleet?start=${day}&day=${day}`);
    await page.getByTestId('fleet-plan').waitFor();
    for (const id of booked) await page.getByTestId(`assignment-${id}`).first().waitFor();
    await page.getByTestId(`assignment-${booked[0]}`).first().scrollIntoViewIfNeeded();
    await screenshot(page, `coordinator-plan-with-proposal-${label}`);
    await page.context().close();
  });
});

describe.each([
  ['phone', PHONE, 0],
  ['wide', WIDE, 1],
] as const)('driver at %s width', (label, viewport, n) => {
  it('when the driver checks the vehicle out and back in with damage notes, then the kilometres accrue and the damage becomes a finding', async () => {
    const booking = bookings[n];
    const page = await newPage(browser, viewport);
    await signIn(page, 'driver@fenwater.example', 'proofyard-demo', `/fleet/assignments/${booking.id}`);
    await page.getByTestId('assignment-detail').waitFor();
    await expect(page.getByText(/permits and plates/i).first().isVisible()).resolves.toBe(true);

    await page.getByTestId('checkout-odometer').fill(String(booking.odometerKm));
    await page.getByTestId('checkout-charge').fill('86');
    await page.getByTestId('checkout-submit').click();
    await page.getByTestId('checkin-form').waitFor();
    await screenshot(page, `driver-checked-out-${label}`);

    await page.getByTestId('checkin-odometer').fill(String(booking.odometerKm - 5));
    await page.getByTestId('checkin-charge').fill('40');
    await page.getByTestId('checkin-submit').click();
    // An odometer that goes down is refused with the reason, and nothing is checked in.
    await waitUntil('the odometer is refused', async () => /below|lower|less|down|back/i.test((await page.getByTestId('checkin-form').textContent()) ?? ''));

    await page.getByTestId('checkin-odometer').fill(String(booking.odometerKm + 42));
    await page.getByTestId('checkin-damage').fill('Stone chip on the windscreen, driver side');
    await page.getByTestId('checkin-submit').click();
    await page.getByTestId('checkin-finding-link').waitFor();
    await screenshot(page, `driver-checked-in-${label}`);

    const asset = await apiGet<{ odometerKm: number }>(coordinatorToken, `/api/assets/${booking.assetId}`);
    expect(asset.odometerKm).toBe(booking.odometerKm + 42);
    await page.context().close();
  });
});
