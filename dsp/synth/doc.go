// Package synth synthesises the dry, direct-injection guitar signal that the
// built-in demonstration feeds to the circuit models, so that no recorded
// audio has to be shipped.
//
// # Model
//
// Each note is an extended Karplus–Strong plucked string (Karplus & Strong
// 1983; Jaffe & Smith 1983). A loop of N samples is closed through
//
//   - the loss / decay-stretch filter Hd(z) = (1−S) + S·z⁻¹ (Options.Stretch),
//   - a per-period loss factor ρ, shared by all notes and chosen so that the
//     open low string's fundamental decays by 60 dB in Options.Sustain,
//   - the fractional-delay allpass Hc(z) = (c + z⁻¹)/(1 + c·z⁻¹).
//
// Tuning: with P = fs/f0 the period in samples and ω0 = 2π/P, the integer
// delay N and the allpass share Δ are split so that
// N + τd(ω0) + Δ = P, with τd the exact phase delay of Hd at ω0 and
// Δ ∈ [0.5, 1.5). Jaffe & Smith's first-order design c = (1−Δ)/(1+Δ) is
// replaced by the exact one c = sin(ω0(1−Δ)/2) / sin(ω0(1+Δ)/2), which gives
// the allpass a phase delay of exactly Δ at ω0; the fundamental is then at
// f0 to far better than a cent (the tests measure a few thousandths).
//
// Decay: every period multiplies the partial at ω by g(ω) = ρ·|Hd(e^{jω})|,
// |Hd(e^{jω})|² = 1 − 2S(1−S)(1 − cos ω), so a note's fundamental has
//
//	T60 = 3·ln 10 / (−f0 · ln(ρ·|Hd(e^{jω0})|))
//
// and higher notes, making more round trips per second, decay faster; upper
// harmonics decay faster still through Hd.
//
// Excitation: one period of seeded white noise, passed through the
// pick-direction low-pass (1−p)/(1−p·z⁻¹) (p = 0.1 on downstrokes, 0.6 on
// upstrokes), a dynamic-level one-pole low-pass whose cutoff f0·2^(1+5v)
// rises with the velocity v (softer plucks are darker, after Jaffe & Smith's
// dynamic-level filter), scaled to RMS v, and finally the pick-position comb
// 1 − z^(−βP) for a pluck at β = Options.PickPosition of the string length
// from the bridge: |1 − e^(−jωβP)| = 2|sin(ωβP/2)| vanishes at the harmonics
// that are multiples of 1/β (all even harmonics for β = 1/2).
//
// Output: optionally the pickup-position comb 1 − z^(−γP) for a pickup at
// γ = Options.PickupPosition of the length from the bridge; otherwise the
// loop signal itself. Fractional comb delays use linear interpolation.
//
// # Playing
//
// Six strings in standard tuning E2 A2 D3 G3 B3 E4 (common practice),
// twelve-tone equal temperament with A4 = 440 Hz. Each string sounds one note
// at a time and keeps ringing until its next note: a new note, or a
// Velocity-0 note that only damps, ramps the old note's loop loss up so it
// falls by at least 60 dB within Options.DampTime, after which it is dropped.
// Notes whose onsets follow each other within 50 ms form one stroke; a
// stroke across several strings is a downstroke if it crosses them from low
// to high and an upstroke otherwise, and single-note strokes alternate
// (alternate picking). DemoPhrase strums its chords with 6–8 ms between
// strings.
//
// Level: Render scales its result so the absolute peak equals Options.Peak
// (default 0.9), so all samples lie within [−1, 1]. Equal inputs and seeds
// give identical samples (math/rand/v2 PCG sources seeded from Options.Seed).
//
// # References
//
//   - K. Karplus, A. Strong, "Digital synthesis of plucked-string and drum
//     timbres", Computer Music Journal 7(2), 1983, pp. 43–55.
//   - D. A. Jaffe, J. O. Smith, "Extensions of the Karplus–Strong
//     plucked-string algorithm", Computer Music Journal 7(2), 1983,
//     pp. 56–69.
//   - F. J. Harris, "On the use of windows for harmonic analysis with the
//     discrete Fourier transform", Proc. IEEE 66(1), 1978 (test measurements).
//
// # Non-goals
//
// No string stiffness (inharmonicity), bends, vibrato, slides, fret-hand
// noise, sympathetic coupling between strings, body or pickup electrical
// resonance (the pickup is only its position comb), and no streaming or
// real-time path: rendering is offline into one slice (10 s at 48 kHz takes
// a few tens of milliseconds).
package synth
