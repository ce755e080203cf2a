/**
 * Splits read aloud never pile up (the speech wrapper replaced by a recorder that ends utterances
 * when the test says so): two lanes crossing 0.3 s apart get both sentences, one after the other;
 * a third crossing while one waits replaces the waiting one; a lane crossing again while its own
 * sentence is spoken cuts that sentence off; a sentence that waited too long is dropped; hush
 * silences everything.
 */
import type { SpeakOptions } from '../../store/speech';
import { STALE_SENTENCE_MS, createSplitVoice } from '../../components/clock/split-voice';

function recorder() {
  const spoken: string[] = [];
  const pending: { text: string; onEnd?: SpeakOptions['onEnd'] }[] = [];
  let stops = 0;
  return {
    spoken,
    get stops() {
      return stops;
    },
    /** Utterances the platform still holds (speaking or queued): never more than one. */
    get held() {
      return pending.length;
    },
    speech: {
      speak: (text: string, options?: SpeakOptions) => {
        spoken.push(text);
        pending.push({ text, onEnd: options?.onEnd });
      },
      stop: () => {
        stops += 1;
        const all = pending.splice(0);
        all.forEach((p) => p.onEnd?.('stopped'));
      },
    },
    /** The utterance being spoken ends normally. */
    finish() {
      const p = pending.shift();
      p?.onEnd?.('done');
    },
  };
}

describe('the split voice', () => {
  let now = 1_000_000;
  beforeEach(() => {
    now = 1_000_000;
    jest.spyOn(Date, 'now').mockImplementation(() => now);
  });
  afterEach(() => jest.restoreAllMocks());

  it('speaks at once when quiet', () => {
    const r = recorder();
    const voice = createSplitVoice(r.speech);
    voice.say('inner', 'Anna, opener, twenty-four three');
    expect(r.spoken).toEqual(['Anna, opener, twenty-four three']);
  });

  it('a pair 0.3 s apart: the second lane waits for the first sentence, then is spoken; never two held at once', () => {
    const r = recorder();
    const voice = createSplitVoice(r.speech);
    voice.say('inner', 'Anna, lap one, thirty-one six');
    now += 300;
    voice.say('outer', 'Bram, lap one, thirty-one two');
    expect(r.spoken).toEqual(['Anna, lap one, thirty-one six']);
    expect(r.held).toBe(1);
    expect(voice.state()).toEqual({ speaking: 'Anna, lap one, thirty-one six', waiting: 'Bram, lap one, thirty-one two' });
    now += 1800;
    r.finish();
    expect(r.spoken).toEqual(['Anna, lap one, thirty-one six', 'Bram, lap one, thirty-one two']);
    expect(r.held).toBe(1);
  });

  it('a newer sentence replaces the one waiting (the older is skipped)', () => {
    const r = recorder();
    const voice = createSplitVoice(r.speech);
    voice.say('g1', 'Anna, lap two');
    voice.say('g2', 'Bram, lap two');
    voice.say('g3', 'Cor, lap two');
    r.finish();
    expect(r.spoken).toEqual(['Anna, lap two', 'Cor, lap two']);
  });

  it('the lane being spoken crosses again: its old sentence is cut off and the new one spoken', () => {
    const r = recorder();
    const voice = createSplitVoice(r.speech);
    voice.say('inner', 'Lap one, thirty-one six');
    voice.say('inner', 'Lap two, thirty-one four');
    expect(r.stops).toBe(1);
    expect(r.spoken).toEqual(['Lap one, thirty-one six', 'Lap two, thirty-one four']);
    expect(r.held).toBe(1);
    // The stopped sentence's end does not start anything else.
    r.finish();
    expect(r.spoken).toHaveLength(2);
  });

  it(`a sentence that waited more than ${STALE_SENTENCE_MS / 1000} s is dropped`, () => {
    const r = recorder();
    const voice = createSplitVoice(r.speech);
    voice.say('inner', 'Anna, lap one');
    voice.say('outer', 'Bram, lap one');
    now += STALE_SENTENCE_MS + 1;
    r.finish();
    expect(r.spoken).toEqual(['Anna, lap one']);
    expect(voice.state()).toEqual({ speaking: null, waiting: null });
  });

  it('hush stops the voice and forgets what waits', () => {
    const r = recorder();
    const voice = createSplitVoice(r.speech);
    voice.say('inner', 'Anna, lap one');
    voice.say('outer', 'Bram, lap one');
    voice.hush();
    expect(r.stops).toBe(1);
    expect(voice.state()).toEqual({ speaking: null, waiting: null });
    voice.say('outer', 'Bram, lap two');
    expect(r.spoken).toEqual(['Anna, lap one', 'Bram, lap two']);
  });
});
