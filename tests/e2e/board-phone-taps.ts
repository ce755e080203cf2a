/**
 * Tapping the board's cues from a browser test. The phone board shows one set of chips at a
 * time (the focus cues or one phase): when the chip is not on screen, its phase is opened first,
 * one tap, as a coach does.
 */
import type { Page } from '@playwright/test';

export async function tapCue(page: Page, cue: { id: string; phase: string }, zone: 'needs_work' | 'good' = 'needs_work') {
  const chip = page.getByTestId(zone === 'good' ? `cue-good-${cue.id}` : `cue-chip-${cue.id}`);
  if ((await chip.count()) === 0) await page.getByTestId(`phase-tab-${cue.phase}`).click();
  await chip.click();
}
