"""Strike and sound: modal excitation, far-field radiation, strike-point advice, the WAV preview."""

import dataclasses
import json
import math
import subprocess

from dataclasses import replace

import numpy as np
import pytest
import scipy.integrate
import scipy.optimize
import scipy.io.wavfile
import scipy.signal
import scipy.special
from typer.testing import CliRunner

from conftest import installed_command

from membrane.cli import app
from membrane.drum import load_drum
from membrane.modes import ModeSet
from membrane.solver import solve
from membrane.strike import (MALLETS, Listener, Strike, best_strike_radius, pulse_spectrum,
                             save_wav, strike_partials, synthesise)

runner = CliRunner()
KETTLE = load_drum("kettledrum")


@pytest.fixture(scope="module")
def stiff():
    return solve(KETTLE, "stiff", m_max=6, n_max=3)


@pytest.fixture(scope="module")
def ideal():
    return solve(KETTLE, "ideal", m_max=6, n_max=3)


def levels(partials):
    return {(p.mode.m, p.mode.n): p.level_db for p in partials}


# ----------------------------------------------------------------------------- the blow
@pytest.mark.parametrize("x", [0.3, 2.0, math.pi, 5.0, 3 * math.pi, 12.0])
def test_half_sine_spectrum_matches_quadrature(x):
    # reference: the Fourier integral of the pulse by scipy quadrature (impulse 1 N s)
    tc = 1e-3
    w = x / tc
    force = lambda t: math.pi / (2 * tc) * math.sin(math.pi * t / tc)  # noqa: E731
    re = scipy.integrate.quad(lambda t: force(t) * math.cos(w * t), 0, tc, epsabs=1e-13)[0]
    im = scipy.integrate.quad(lambda t: -force(t) * math.sin(w * t), 0, tc, epsabs=1e-13)[0]
    assert complex(pulse_spectrum(w, contact_time=tc)) == pytest.approx(complex(re, im), abs=1e-9)


# ----------------------------------------------------------------------------- where it is struck
def test_centre_strike_excites_only_axisymmetric_modes(stiff):
    lev = levels(strike_partials(stiff, strike=Strike(radius_fraction=0.0)))
    for (m, n), value in lev.items():
        if m >= 1:
            assert value < -120
    assert max(lev[(0, 1)], lev[(0, 2)]) > -10


def test_strike_on_the_nodal_circle_of_0_2_leaves_it_silent(ideal):
    # exact node r/a = j01/j02 from scipy's Bessel zeros (A&S Table 9.5)
    j0 = scipy.special.jn_zeros(0, 2)
    lev = levels(strike_partials(ideal, strike=Strike(radius_fraction=j0[0] / j0[1])))
    assert lev[(0, 2)] < -120
    assert lev[(0, 1)] > -20 and lev[(0, 3)] > -40
    # A&S Table 9.5: (0,2) nodal circle at r/a = j01/j02 = 0.4357 (4 digits: about 70 dB down, not silent)
    lev = levels(strike_partials(ideal, strike=Strike(radius_fraction=0.4357)))
    assert lev[(0, 2)] < -60 and lev[(0, 1)] > -20


def test_listener_on_the_axis_hears_no_modes_with_nodal_diameters(stiff):
    lev = levels(strike_partials(stiff, listener=Listener(angle=0.0)))
    assert all(v < -120 for (m, n), v in lev.items() if m >= 1)
    assert lev[(0, 1)] > -20


def test_listener_on_a_nodal_line_of_the_struck_pair_member(stiff):
    # the (2,1) member cos 2(theta - theta0) has nodal diameters at theta0 +- 45 degrees
    lev = levels(strike_partials(stiff, strike=Strike(angle=0.3),
                                 listener=Listener(azimuth=0.3 + math.pi / 4)))
    assert lev[(2, 1)] < -120 and lev[(1, 1)] > -40 and lev[(0, 1)] > -40


def test_far_field_matches_a_direct_rayleigh_integral(ideal):
    """B_j against the Rayleigh integral (Kinsler & Frey, Fundamentals of Acoustics: baffled
    source, p = i omega rho / (2 pi) * integral of v e^{-ikR'}/R' dS), evaluated by quadrature
    over the head at a distant point, with the modal mass and the pulse spectrum also by
    quadrature and the undamped oscillator's response Q = phi(r0) F(omega) / (M omega)."""
    drum = ideal.drum
    a, sigma, rho, c = drum.head.radius, drum.head.areal_density, drum.air.density, drum.air.sound_speed
    strike, far = Strike(radius_fraction=0.6, angle=0.5, contact_time=1.2e-3), 400.0
    listener = Listener(angle=math.radians(50), distance=far, azimuth=0.9)
    got = {(p.mode.m, p.mode.n): p for p in strike_partials(ideal, strike=strike, listener=listener)}
    xg, wg = np.polynomial.legendre.leggauss(80)
    r = 0.5 * a * (xg + 1)
    wr = 0.5 * a * wg
    th = np.linspace(0, 2 * np.pi, 256, endpoint=False)
    R, TH = np.meshgrid(r, th, indexing="ij")
    dS = np.outer(wr * r, np.full(th.size, 2 * np.pi / th.size))
    for m, n in [(0, 1), (1, 1), (2, 1), (0, 2), (3, 2)]:
        alpha = scipy.special.jn_zeros(m, n)[-1] / a
        w = alpha * math.sqrt(drum.head.tension / sigma)
        k = w / c
        psi = scipy.special.jv(m, alpha * R) * np.cos(m * (TH - strike.angle))
        mass = sigma * np.sum(psi ** 2 * dS)
        tc = strike.contact_time
        force = lambda t: math.pi / (2 * tc) * math.sin(math.pi * t / tc)  # noqa: E731
        f_hat = complex(scipy.integrate.quad(lambda t: force(t) * math.cos(w * t), 0, tc)[0],
                        scipy.integrate.quad(lambda t: -force(t) * math.sin(w * t), 0, tc)[0])
        q = scipy.special.jv(m, alpha * strike.radius_fraction * a) * f_hat / (mass * w)
        pol, az = listener.angle, listener.azimuth
        point = far * np.array([math.sin(pol) * math.cos(az), math.sin(pol) * math.sin(az), math.cos(pol)])
        dist = np.sqrt((point[0] - R * np.cos(TH)) ** 2 + (point[1] - R * np.sin(TH)) ** 2 + point[2] ** 2)
        p = 1j * w * rho / (2 * np.pi) * np.sum(1j * w * q * psi * np.exp(-1j * k * dist) / dist * dS)
        expected = p * np.exp(1j * k * far)  # the library's B_j leaves out the delay e^{-ikR}
        assert got[(m, n)].pressure == pytest.approx(expected, rel=2e-3)


def test_effective_mass_with_a_kettle_is_the_residue_of_the_dynamic_stiffness():
    """One ideal (0,1) shape on a kettle, no other air: Z(w) = K + S(w) - w^2 M with the duct's
    uniform-pressure term S = w^2 rho cot(kL) W^2 / (k pi a^2) (the plane wave in a rigid-ended
    tube, input impedance -i rho c cot kL: Kinsler et al., Fundamentals of Acoustics, 4th ed.,
    ch. 10; written out here again, W by quadrature); the effective mass must be -Z'/(2w) at the root (central
    differences), and the root must sit between the in-vacuum and the lumped-kettle limit."""
    from membrane.physics.vacuum import ideal_basis
    from membrane.modes import Mode
    from membrane.strike import effective_mass

    head, air, vol = KETTLE.head, KETTLE.air, KETTLE.body.volume
    a = head.radius
    basis = ideal_basis(m=0, count=1, radius=a, tension=head.tension, areal_density=head.areal_density)
    mass, stiff_k = basis.modal_mass[0], basis.modal_mass[0] * basis.omega[0] ** 2
    big_w = 2 * np.pi * scipy.integrate.quad(lambda r: scipy.special.j0(basis.k1[0] * r) * r, 0, a)[0]
    depth = vol / (np.pi * a * a)

    def z(w):
        k = w / air.sound_speed
        return stiff_k + w * w * air.density / (math.tan(k * depth) * k * np.pi * a * a) * big_w ** 2 - w * w * mass

    w0 = basis.omega[0]
    lumped = math.sqrt((stiff_k + air.density * air.sound_speed ** 2 * big_w ** 2 / vol) / mass)
    root = scipy.optimize.brentq(z, w0, 1.5 * lumped)
    assert w0 < root
    mode = Mode(m=0, n=1, frequency=root / (2 * np.pi), decay=None, multiplicity=1, omega=root,
                coefficients=np.array([1.0]), basis=basis)
    h = 1e-4 * root
    residue = -(z(root + h) - z(root - h)) / (2 * h) / (2 * root)
    assert effective_mass(mode, KETTLE, "full") == pytest.approx(residue, rel=1e-6)
    assert effective_mass(mode, KETTLE, "stiff") == pytest.approx(stiff_k / root ** 2, rel=1e-12)


def test_plane_wave_body_stiffness_is_the_closed_tube_air_spring():
    """The one formula strike and the solver share (physics.cavity.plane_wave_stiffness) against
    the plane-wave closed tube of Kinsler et al., Fundamentals of Acoustics, 4th ed., ch. 10: a
    piston of area S = pi a^2 over a tube of length L sees the input impedance -i rho c S cot kL
    (time e^{i w t}), a stiffness rho c S w cot kL per unit displacement, and, at the far end, the
    transfer term -i rho c S csc kL; at long wavelength the cavity's stiffness rho c^2 S^2 / V
    (the Helmholtz resonator's spring, same chapter). Written out here again from the book."""
    from membrane.physics.cavity import plane_wave_stiffness
    from membrane.strike import body_stiffness
    from membrane.modes import Mode
    from membrane.physics.vacuum import ideal_basis

    air = KETTLE.air
    rho, c = air.density, air.sound_speed
    a, depth = 0.33, 0.5
    area = np.pi * a * a
    air_terms = dict(radius=a, depth=depth, density=rho, sound_speed=c)
    for w in (2 * np.pi * 90.0, 2 * np.pi * 260.0 + 4.0j, 2 * np.pi * 510.0 - 0.5j):
        kl = w * depth / c
        s, _ = plane_wave_stiffness(w, volume_displacements=[area], **air_terms)
        assert s == pytest.approx(rho * c * area * w * np.cos(kl) / np.sin(kl), rel=1e-12)
        # a shell: the pistons 1 and 2 (outward) feel each other through csc kL
        w1, w2 = 0.3 * area, -0.7 * area
        s2, _ = plane_wave_stiffness(w, volume_displacements=[w1, w2], **air_terms)
        expected = rho * c * w / area * ((w1 ** 2 + w2 ** 2) * np.cos(kl) / np.sin(kl) + 2 * w1 * w2 / np.sin(kl))
        assert s2 == pytest.approx(expected, rel=1e-12)
        # the omega-derivative (central differences; S is analytic in omega)
        h = 1e-5 * abs(w)
        for disp in ([area], [w1, w2]):
            slope = plane_wave_stiffness(w, volume_displacements=disp, **air_terms)[1]
            fd = (plane_wave_stiffness(w + h, volume_displacements=disp, **air_terms)[0]
                  - plane_wave_stiffness(w - h, volume_displacements=disp, **air_terms)[0]) / (2 * h)
            assert slope == pytest.approx(fd, rel=1e-7)
    # long wavelength, kL = 1e-4: the lumped spring rho c^2 S^2 / V, to (kL)^2 / 3
    w = 1e-4 * c / depth
    s, _ = plane_wave_stiffness(w, volume_displacements=[area], **air_terms)
    assert s == pytest.approx(rho * c ** 2 * area ** 2 / (area * depth), rel=1e-8)
    # strike's body term is the same formula with the mode's W by quadrature and L = V / (pi a^2)
    head, vol = KETTLE.head, KETTLE.body.volume
    basis = ideal_basis(m=0, count=1, radius=head.radius, tension=head.tension,
                        areal_density=head.areal_density)
    big_w = 2 * np.pi * scipy.integrate.quad(lambda r: scipy.special.j0(basis.k1[0] * r) * r, 0,
                                             head.radius, epsabs=0, epsrel=1e-13)[0]
    mode = Mode(m=0, n=1, frequency=100.0, decay=None, multiplicity=1, omega=2 * np.pi * 100.0,
                coefficients=np.array([1.0]), basis=basis)
    w = 2 * np.pi * 100.0 + 1.0j
    kl = w * vol / (np.pi * head.radius ** 2) / c
    s, _ = body_stiffness(mode, KETTLE, w)
    assert s == pytest.approx(rho * c * w * np.cos(kl) / np.sin(kl) * big_w ** 2 / (np.pi * head.radius ** 2),
                              rel=1e-10)


# ----------------------------------------------------------------------------- with what
@pytest.mark.parametrize("physics", ["stiff", "full"])
def test_harder_mallets_raise_high_partials_monotonically(physics, request):
    stiff = request.getfixturevalue(physics)
    partials = {name: strike_partials(stiff, strike=Strike(contact_time=tc)) for name, tc in MALLETS.items()}
    order = ["soft", "medium", "hard"]
    assert [MALLETS[k] for k in order] == sorted(MALLETS.values(), reverse=True)
    lev = {k: levels(partials[k]) for k in order}
    freq = {(p.mode.m, p.mode.n): p.frequency for p in partials["soft"]}
    # within the soft mallet's main spectral lobe (f t_c < 1.5) every higher partial gains
    # on every lower one, from soft to medium to hard, when the two are resolved: further
    # apart than their summed half-power bandwidths (a heavily damped partial's excitation
    # is the pulse spectrum at a complex frequency, which blurs the order of near neighbours)
    width = {(p.mode.m, p.mode.n): (3 * math.log(10) / p.decay / math.pi if p.decay else 0.0)
             for p in partials["soft"]}
    lobe = [k for k in freq if freq[k] * MALLETS["soft"] < 1.5 and lev["soft"][k] > -100]
    pairs = [(lo, hi) for lo in lobe for hi in lobe
             if freq[hi] > freq[lo] + max(1.0, width[lo] + width[hi])]
    assert len(pairs) >= 10
    for lo, hi in pairs:
        d = [lev[k][hi] - lev[k][lo] for k in order]
        assert d[0] < d[1] < d[2], (lo, hi, d)
    # and the power-weighted mean frequency of all partials rises
    centroid = []
    for k in order:
        pw = np.array([abs(p.pressure) ** 2 for p in partials[k]])
        centroid.append(np.sum(pw * np.array([p.frequency for p in partials[k]])) / np.sum(pw))
    assert centroid[0] < centroid[1] < centroid[2]


def test_bad_strike_values_are_refused():
    for bad in (dict(radius_fraction=-0.1), dict(radius_fraction=1.2), dict(contact_time=-1e-3), dict(contact_time=0.0)):
        with pytest.raises(ValueError):
            Strike(**bad)


# ----------------------------------------------------------------------------- strike-point advice
def test_best_strike_radius_is_the_maximum_of_its_objective(ideal):
    chosen = [(1, 1), (2, 1), (3, 1), (4, 1)]
    advice = best_strike_radius(ideal, modes=chosen)
    # brute force over a fine grid, computing the objective from the level table directly
    best, best_at = -np.inf, None
    for at in np.linspace(0.05, 0.95, 121):
        pw = {(p.mode.m, p.mode.n): abs(p.pressure) ** 2 for p in strike_partials(ideal, strike=Strike(radius_fraction=at))}
        num = sum(v for k, v in pw.items() if k in chosen)
        den = sum(v for k, v in pw.items() if k not in chosen)
        if 10 * math.log10(num / den) > best:
            best, best_at = 10 * math.log10(num / den), at
    assert advice.contrast_db >= best - 1e-6
    assert advice.contrast_db < best + 0.01
    assert advice.radius_fraction == pytest.approx(best_at, abs=0.01)


@pytest.fixture(scope="module")
def full():
    return solve(KETTLE, "full", m_max=6, n_max=3)


def test_best_strike_radius_of_the_kettledrum_for_the_m1_modes(full):
    # What the physics predicts: a strike at r0 excites each mode in proportion to its shape
    # there, and the loudest unwanted partials of a mallet stroke are the (1,n) and (2,n), n >= 2
    # (they radiate well and lie in the mallet's band). Their excitation vanishes on their nodal
    # circles, in vacuum at r/a = j_{m,k}/j_{m,n} (A&S Table 9.5): the outermost ones are (1,2)
    # 0.546, (2,2) 0.610, (1,3) 0.690, (2,3) 0.724. The contrast is best between them, where
    # all four are weak together. The model (full physics) puts it at r/a = 0.650.
    # The trade strikes about a quarter of the way in from the rim, r/a ~ 0.75  # common
    # practice, no source. The model disagrees by 0.1 of the radius: it does not reproduce the
    # rule of thumb, and this test does not widen its band to pretend it does.
    # The claim is about the head's own modes: the bowl's air rows (kind "air", mostly the
    # air in the bowl, docs/mode-identity.md) are left out of this check.
    heads = replace(full, modes=tuple(mo for mo in full if mo.kind == "head"))
    advice = best_strike_radius(heads, modes=[(1, 1), (2, 1), (3, 1), (4, 1)])
    circles = [scipy.special.jn_zeros(m, n)[n - 2] / scipy.special.jn_zeros(m, n)[n - 1]
               for m, n in ((1, 2), (2, 2), (1, 3), (2, 3))]
    assert min(circles) < advice.radius_fraction < max(circles), (advice, circles)
    # and there those four together are weak: their summed squared pressure is more than 10 dB
    # below its largest over strike radii 0.05..0.95 (the model gives -12 dB)
    four = ((1, 2), (2, 2), (1, 3), (2, 3))

    def power(partials):
        return sum(abs(p.pressure) ** 2 for p in partials if (p.mode.m, p.mode.n) in four)

    most = max(power(strike_partials(heads, strike=Strike(radius_fraction=at))) for at in np.linspace(0.05, 0.95, 19))
    assert power(advice.partials) < 0.1 * most


# ----------------------------------------------------------------------------- the preview
def with_decays(modeset):
    """Vacuum modes given T60s from 0.6 s to 2.5 s (a stand-in for full physics)."""
    t60 = np.linspace(2.5, 0.6, len(modeset))
    modes = tuple(dataclasses.replace(mo, decay=float(t)) for mo, t in zip(modeset, t60))
    return ModeSet(modes=modes, physics=modeset.physics, drum=modeset.drum, notes=modeset.notes)


def measured_partials(path, predicted):
    """Frequency by zero-padded Hann FFT peak with parabolic interpolation; decay by complex
    demodulation, zero-phase low-pass and a straight-line fit of the log envelope (scipy)."""
    rate, data = scipy.io.wavfile.read(path)
    x = data.astype(float) / (32768.0 if data.dtype == np.int16 else 1.0)
    t = np.arange(x.size) / rate
    nfft = 16 * x.size
    spec = np.abs(np.fft.rfft(x * np.hanning(x.size), nfft))
    df = rate / nfft
    out = []
    for f0, _ in predicted:
        i = int(round(f0 / df))
        i = i - 50 + int(np.argmax(spec[i - 50:i + 51]))
        a, b, c = np.log(spec[i - 1:i + 2])
        f_est = (i + 0.5 * (a - c) / (a - 2 * b + c)) * df
        z = x * np.exp(-2j * np.pi * f_est * t)
        sos = scipy.signal.butter(4, 5.0, fs=rate, output="sos")
        env = np.abs(scipy.signal.sosfiltfilt(sos, z.real) + 1j * scipy.signal.sosfiltfilt(sos, z.imag))
        db = 20 * np.log10(env / env.max())
        use = (t > 0.25) & (t < t[-1] - 0.25) & (db > db[int(0.25 * rate)] - 40)
        slope = np.polyfit(t[use], np.log(env[use]), 1)[0]
        out.append((f_est, 3 * math.log(10) / -slope))
    return out


def checkable(partials, spacing=25.0):
    """Loud partials with no comparably loud partial within ``spacing`` Hz."""
    keep = []
    for p in partials:
        if p.level_db < -20:
            continue
        near = [q for q in partials if q is not p and abs(q.frequency - p.frequency) < spacing
                and q.level_db > p.level_db - 30]
        if not near:
            keep.append(p)
    return keep


@pytest.mark.parametrize("fmt", ["int16", "float32"])
def test_wav_has_the_predicted_partials_and_decays(stiff, tmp_path, fmt):
    partials = strike_partials(with_decays(stiff))
    rate, seconds = 8000, 4.0
    samples = synthesise(partials, rate=rate, seconds=seconds, contact_time=MALLETS["medium"])
    path = tmp_path / f"preview-{fmt}.wav"
    save_wav(path, samples, rate=rate, sample_format=fmt)
    got_rate, data = scipy.io.wavfile.read(path)
    assert got_rate == rate and data.dtype == (np.int16 if fmt == "int16" else np.float32)
    assert np.max(np.abs(data.astype(float))) / (32767 if fmt == "int16" else 1) == \
        pytest.approx(10 ** (-1 / 20), rel=1e-3)
    check = checkable(partials)
    assert len(check) >= 4
    for p, (f, t60) in zip(check, measured_partials(path, [(p.frequency, p.decay) for p in check])):
        assert abs(f - p.frequency) < 0.1, p.mode.label
        assert t60 == pytest.approx(p.decay, rel=0.10), p.mode.label


def test_wav_from_full_physics_has_the_model_decays(full, tmp_path):
    partials = strike_partials(full)
    samples = synthesise(partials, rate=8000, seconds=4.0, contact_time=MALLETS["medium"])
    path = tmp_path / "full.wav"
    save_wav(path, samples, rate=8000)
    check = [p for p in checkable(partials) if 0.5 < p.decay < 20]
    assert check
    for p, (f, t60) in zip(check, measured_partials(path, [(p.frequency, p.decay) for p in check])):
        assert abs(f - p.frequency) < 0.1, p.mode.label
        assert t60 == pytest.approx(p.decay, rel=0.10), p.mode.label


def test_synthesis_is_the_direct_sum_of_the_partials(full):
    # the formula evaluated sample by sample, partial by partial (numpy, no blocking)
    import membrane.audio
    import membrane.strike

    assert membrane.strike.synthesise is membrane.audio.synthesise  # its old home still works
    assert membrane.strike.save_wav is membrane.audio.save_wav
    partials = strike_partials(full)
    rate, seconds, t_c = 22050, 1.3, MALLETS["hard"]
    samples = synthesise(partials, rate=rate, seconds=seconds, contact_time=t_c)
    t = np.arange(int(round(rate * seconds))) / rate
    direct = np.zeros_like(t)
    for p in partials:
        if p.pressure != 0 and p.frequency < rate / 2:
            rate_of_decay = 3 * math.log(10) / p.decay
            direct += np.imag(p.pressure * np.exp(2j * math.pi * p.frequency * t)) * np.exp(-rate_of_decay * t)
    direct[t < t_c] *= 0.5 * (1 - np.cos(np.pi * t[t < t_c] / t_c))
    end = t > seconds - 0.01
    direct[end] *= 0.5 * (1 + np.cos(np.pi * (t[end] - (seconds - 0.01)) / 0.01))
    direct *= 10 ** (-1 / 20) / np.max(np.abs(direct))
    assert samples.shape == direct.shape
    np.testing.assert_allclose(samples, direct, rtol=0, atol=1e-12)


@pytest.mark.parametrize("fmt", ["int16", "float32"])
def test_wav_file_is_byte_for_byte_what_scipy_writes(tmp_path, fmt):
    # scipy.io.wavfile.write as the reference writer of the same samples; soundfile reads it too
    import soundfile

    x = np.sin(np.arange(1001) / 7.0) * np.linspace(1.2, -1.2, 1001)  # clipped at both ends
    ours, theirs = tmp_path / "ours.wav", tmp_path / "theirs.wav"
    save_wav(ours, x, rate=11025, sample_format=fmt)
    data = (np.round(np.clip(x, -1, 1) * 32767).astype(np.int16) if fmt == "int16"
            else x.astype(np.float32))
    scipy.io.wavfile.write(theirs, 11025, data)
    assert ours.read_bytes() == theirs.read_bytes()
    back, rate = soundfile.read(ours, dtype=fmt)
    assert rate == 11025 and np.array_equal(back, data)


def test_vacuum_preview_needs_an_assumed_decay(stiff):
    with pytest.raises(ValueError, match="full"):
        synthesise(strike_partials(stiff), rate=8000, seconds=0.5, contact_time=1e-3)
    samples = synthesise(strike_partials(stiff), rate=8000, seconds=0.5, contact_time=1e-3, assume_t60=2.0)
    assert samples.shape == (4000,) and np.isfinite(samples).all()


# ----------------------------------------------------------------------------- the command
def run(*args):
    return runner.invoke(app, ["strike", *args])


STIFF = ["kettledrum", "--physics", "stiff"]


def test_cli_json_best_for_and_wav(tmp_path):
    out = tmp_path / "k.wav"
    result = run(*STIFF, "--best-for", "1,1", "2,1", "3,1", "4,1", "--out", str(out),
                 "--assume-t60", "2 s", "--rate", "8000", "--seconds", "1", "--format", "json")
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert data["best_for"]["modes"] == [{"m": m, "n": 1} for m in (1, 2, 3, 4)]
    assert 0.05 <= data["best_for"]["at"] <= 0.95 and data["strike"]["at"] == data["best_for"]["at"]
    assert max(row["level_db"] for row in data["partials"]) == 0.0
    assert data["wav"]["rate_hz"] == 8000 and out.exists()
    rate, samples = scipy.io.wavfile.read(out)
    assert rate == 8000 and samples.dtype == np.int16 and samples.size == 8000
    # again without --force: refused, file untouched
    before = out.read_bytes()
    again = run(*STIFF, "--out", str(out), "--assume-t60", "2 s")
    assert again.exit_code == 2 and "--force" in again.output and out.read_bytes() == before
    assert run(*STIFF, "--out", str(out), "--assume-t60", "2 s", "--rate", "8000", "--seconds", "0.5",
               "--force", "--wav-format", "float32", "--format", "csv").exit_code == 0
    assert scipy.io.wavfile.read(out)[1].dtype == np.float32


def test_cli_table_and_quoted_best_for_agree():
    a = json.loads(run(*STIFF, "--best-for", "1,1 2,1", "--format", "json").stdout)
    b = json.loads(run(*STIFF, "--best-for", "1,1", "--best-for", "2,1", "--format", "json").stdout)
    assert a["best_for"] == b["best_for"]
    c = json.loads(runner.invoke(app, ["strike", "--best-for", "1,1", "2,1", "kettledrum", "--physics",
                                       "stiff", "--format", "json"]).stdout)
    assert c["best_for"] == a["best_for"]
    table = run(*STIFF, "--mallet", "hard", "--at", "0")
    assert table.exit_code == 0 and "silent" in table.output and "(0,1)" in table.output


@pytest.mark.parametrize("args, word", [
    (["--at", "1.5"], "--at"),
    (["--at", "-0.2"], "--at"),
    (["--contact-time", "-1 ms"], "--contact-time"),
    (["--mallet", "squishy"], "--mallet"),
    (["--best-for", "1,1", "x"], "x"),
    (["extra"], "extra"),
    (["--best-for", "9,9"], "9,9"),
    (["--out", "never.wav"], "--physics"),
    (["--listener-angle", "120"], "--listener-angle"),
])
def test_cli_bad_input_is_one_line_and_exit_2(args, word, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    result = run(*STIFF, *args)
    assert result.exit_code == 2, result.output
    lines = [ln for ln in result.output.splitlines() if ln.strip()]
    assert len(lines) == 1 and word in lines[0] and "Traceback" not in result.output
    assert not (tmp_path / "never.wav").exists()


def test_real_command_writes_a_wav(tmp_path):
    out = tmp_path / "preview.wav"
    proc = subprocess.run([*installed_command(), "strike", *STIFF, "--out", str(out),
                           "--assume-t60", "1.5 s", "--rate", "8000", "--seconds", "0.5",
                           "--format", "json"], capture_output=True, text=True, timeout=120)
    assert proc.returncode == 0, proc.stderr
    assert json.loads(proc.stdout)["wav"]["path"] == str(out)
    assert scipy.io.wavfile.read(out)[1].size == 4000
    proc = subprocess.run([*installed_command(), "strike", *STIFF, "--out", str(out),
                           "--assume-t60", "1.5 s"], capture_output=True, text=True, timeout=120)
    assert proc.returncode == 2 and len(proc.stderr.strip().splitlines()) == 1


def test_cli_plot_of_levels_against_strike_radius(tmp_path):
    png = tmp_path / "levels.png"
    result = run(*STIFF, "--best-for", "1,1", "2,1", "--plot", str(png), "--format", "json")
    assert result.exit_code == 0, result.output
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n" and json.loads(result.stdout)["plot"] == str(png)
    assert run(*STIFF, "--plot", str(png)).exit_code == 2
    assert run(*STIFF, "--plot", str(tmp_path / "levels.gif")).exit_code == 2


def test_effective_mass_of_a_shell_mode_is_the_residue_of_the_two_head_dynamic_stiffness():
    """Two ideal (0,1) shapes, one per head of a shell, coupled only by the duct's plane wave
    (plane waves in the closed tube between the heads: cot(kL) self and csc(kL) transfer
    impedances, Kinsler et al. ch. 10; outward displacements): a 2 x 2
    Z(w); at its lower root the effective mass must be -c^T Z' c / (2 w), c the null vector."""
    from membrane.modes import Mode
    from membrane.physics.vacuum import ideal_basis
    from membrane.strike import effective_mass

    snare = load_drum("snare")
    heads = (snare.head, snare.resonant_head)
    rho, c, depth = snare.air.density, snare.air.sound_speed, snare.body.depth
    a = heads[0].radius
    bases = [ideal_basis(m=0, count=1, radius=a, tension=h.tension, areal_density=h.areal_density)
             for h in heads]
    mass = np.array([b.modal_mass[0] for b in bases])
    stiff_k = mass * np.array([b.omega[0] for b in bases]) ** 2
    big_w = np.array([2 * np.pi * scipy.integrate.quad(lambda r: scipy.special.j0(b.k1[0] * r) * r, 0, a)[0]
                      for b in bases])

    def z(w):
        x = w * depth / c
        s = rho * c * w / (np.pi * a * a) * np.array(
            [[big_w[0] ** 2 / math.tan(x), big_w[0] * big_w[1] / math.sin(x)],
             [big_w[0] * big_w[1] / math.sin(x), big_w[1] ** 2 / math.tan(x)]])
        return np.diag(stiff_k) + s - w * w * np.diag(mass)

    lo = 2 * np.pi * 20.0
    grid = np.linspace(lo, 0.99 * np.pi * c / depth, 4000)
    det = np.array([np.linalg.det(z(w)) for w in grid])
    i = int(np.argmax(np.sign(det[:-1]) != np.sign(det[1:])))
    root = scipy.optimize.brentq(lambda w: np.linalg.det(z(w)), grid[i], grid[i + 1], xtol=1e-12)
    vals, vecs = np.linalg.eigh(z(root))
    vec = vecs[:, np.argmin(np.abs(vals))]
    mode = Mode(m=0, n=1, frequency=root / (2 * np.pi), decay=None, multiplicity=1, omega=root,
                coefficients=np.array([vec[0]]), basis=bases[0],
                resonant_coefficients=np.array([vec[1]]), resonant_basis=bases[1])
    h = 1e-5 * root
    residue = -vec @ ((z(root + h) - z(root - h)) / (2 * h)) @ vec / (2 * root)
    assert effective_mass(mode, snare, "full") == pytest.approx(residue, rel=1e-6)


def test_levels_are_printed_to_a_sensible_precision():
    from membrane.cli.strike import level_text
    from membrane.presets import SILENT_DB

    # common practice, no source: tenths of a dB near the top, whole dB far down, a bound below
    assert level_text(-4.14) == "-4.1"
    assert level_text(-83.4) == "-83"
    assert level_text(-169.7) == "< -120"
    assert level_text(SILENT_DB) == "silent"
