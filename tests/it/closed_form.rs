#![allow(clippy::approx_constant, clippy::float_cmp)]
//! The solver against closed-form results of mechanics of materials
//! (e.g. Gere & Goodno, Mechanics of Materials, ch. 2, from memory: statically
//! indeterminate axial members, thermal effects, misfits), each in an
//! invented scenario, to 1e-9 relative.

use crate::common;

use common::{force, rel, solve, solve_err};

const KIP: f64 = 4_448.221_615_260_5;
const IN: f64 = 0.0254;
const KSI: f64 = KIP / (IN * IN);

/// Parallel parts between the same nodes share the load in proportion to
/// E A (equal length): F_i = P E_i A_i / Σ E A.
#[test]
fn parallel_parts_share_by_ea() {
    let text = "
material concrete { E = 4000 ksi }
material steel { E = 29000 ksi }
node base at 0 ft
node top at 12 ft
fix base
part core { material = concrete; area = 80 in^2; ends = base, top }
part tube { material = steel; area = 12 in^2; ends = base, top }
load top = -300 kip
";
    let (m, s) = solve(text);
    let (ea_c, ea_s) = (4000.0 * 80.0, 29000.0 * 12.0);
    let p = -300.0 * KIP;
    assert!(rel(force(&m, &s, "loads", "core"), p * ea_c / (ea_c + ea_s)) < 1e-9);
    assert!(rel(force(&m, &s, "loads", "tube"), p * ea_s / (ea_c + ea_s)) < 1e-9);
    let c = &s.combinations[0];
    assert!(rel(c.nodes[0].reaction[0].value, 300.0 * KIP) < 1e-9);
    assert!(c.equilibrium_residual.value < 1e-9 * c.force_scale.value);
}

/// Two materials side by side, heated: the self-equilibrating force is
/// (α2 − α1) ΔT L / (1/k1 + 1/k2), the part with the larger α in compression.
#[test]
fn two_material_column_heated() {
    let text = "
material a { E = 29000 ksi; alpha = 6.5e-6 / degF }
material b { E = 10000 ksi; alpha = 12.8e-6 / degF }
node bot at 0 in
node top at 100 in
fix bot
part steel { material = a; area = 4 in^2; ends = bot, top }
part alu { material = b; area = 6 in^2; ends = bot, top }
temperature = 80 degF
";
    let (m, s) = solve(text);
    let l = 100.0 * IN;
    let k1 = 29000.0 * KSI * 4.0 * IN * IN / l;
    let k2 = 10000.0 * KSI * 6.0 * IN * IN / l;
    let dt = 80.0 * 5.0 / 9.0;
    let a1 = 6.5e-6 * 9.0 / 5.0;
    let a2 = 12.8e-6 * 9.0 / 5.0;
    let n = (a2 - a1) * dt * l / (1.0 / k1 + 1.0 / k2);
    assert!(rel(force(&m, &s, "loads", "steel"), n) < 1e-9);
    assert!(rel(force(&m, &s, "loads", "alu"), -n) < 1e-9);
}

/// A bar fixed at both ends and heated: σ = −E α ΔT, whatever its length.
#[test]
fn restrained_bar_heated() {
    for len in ["3 ft", "40 ft", "1.7 m"] {
        let text = format!(
            "
material steel {{ E = 200 GPa; alpha = 12e-6 / degC }}
node a at 0 m
node b at {len}
fix a, b
part bar {{ material = steel; area = 1000 mm^2; ends = a, b }}
temperature = 35 degC
"
        );
        let (_, s) = solve(&text);
        let sigma = s.combinations[0].parts[0].stress.map_or(0.0, |p| p.value);
        assert!(rel(sigma, -200e9 * 12e-6 * 35.0) < 1e-9, "{len}: {sigma}");
    }
}

/// Two segments in series between fixed ends, load P at the joint:
/// R1 = P k2/(k1+k2) at the end of segment 1... written as the force in
/// segment 1: N1 = P k1/(k1 + k2) (tension when P points away from end 1).
#[test]
fn series_segments_between_fixed_ends() {
    let text = "
material steel { E = 29000 ksi }
node left at 0 in
node mid at 30 in
node right at 80 in
fix left, right
part s1 { material = steel; area = 2 in^2; ends = left, mid }
part s2 { material = steel; area = 3 in^2; ends = mid, right }
load mid = 50 kip
";
    let (m, s) = solve(text);
    let k1 = 29000.0 * 2.0 / 30.0;
    let k2 = 29000.0 * 3.0 / 50.0;
    let p = 50.0 * KIP;
    assert!(rel(force(&m, &s, "loads", "s1"), p * k1 / (k1 + k2)) < 1e-9);
    assert!(rel(force(&m, &s, "loads", "s2"), -p * k2 / (k1 + k2)) < 1e-9);
    let c = &s.combinations[0];
    assert!(rel(c.nodes[0].reaction[0].value, -p * k1 / (k1 + k2)) < 1e-9);
    assert!(rel(c.nodes[2].reaction[0].value, -p * k2 / (k1 + k2)) < 1e-9);
}

/// A heated segment closing an initial gap against a stop:
/// N = (Σ free elongations − gap) / Σ L/(E A).
#[test]
fn gap_closed_by_heating() {
    let text = "
material steel { E = 29000 ksi; alpha = 6.5e-6 / degF }
node west at 0 ft
node east at 60 ft
node stop at 60 ft
fix west, stop
part line { material = steel; area = 3.17 in^2; ends = west, east }
part bumper { stiffness = 400 kip/in; ends = east, stop; slack = 0.25 in; carries = compression }
case hot { temperature line = 150 degF }
case mild { temperature line = 20 degF }
";
    let (m, s) = solve(text);
    let l = 720.0 * IN;
    let free = 6.5e-6 * 9.0 / 5.0 * 150.0 * 5.0 / 9.0 * l;
    let flex = l / (29000.0 * KSI * 3.17 * IN * IN) + 1.0 / (400.0 * KIP / IN);
    let n = -(free - 0.25 * IN) / flex;
    assert!(rel(force(&m, &s, "hot", "line"), n) < 1e-9);
    assert!(rel(force(&m, &s, "hot", "bumper"), n) < 1e-9);
    // 20 degF grows the line 0.094 in < 0.25 in: the gap stays open.
    assert!(force(&m, &s, "mild", "line").abs() < 1e-6);
    assert_eq!(
        s.combinations[1].parts[1].state,
        tandem::solve::PartState::Slack
    );
}

/// A rigid bar pinned at one end and hung from two vertical rods at a1, a2,
/// load W at c: θ = W c / Σ k a², rod forces k_i a_i θ.
#[test]
fn rigid_bar_on_two_rods() {
    let text = "
material steel { E = 29000 ksi }
material alu { E = 10000 ksi }
node pin at (0 ft, 0 ft)
node h1 at (4 ft, 0 ft)
node h2 at (9 ft, 0 ft)
node tip at (12 ft, 0 ft)
node t1 at (4 ft, 8 ft)
node t2 at (9 ft, 10 ft)
fix pin, t1, t2
rigid deck { nodes = pin, h1, h2, tip }
part r1 { material = steel; area = 0.4418 in^2; ends = h1, t1 }
part r2 { material = alu; area = 0.7854 in^2; ends = h2, t2 }
load tip = (0 kip, -6 kip)
";
    let (m, s) = solve(text);
    let k1 = 29000.0 * KSI * 0.4418 * IN * IN / (96.0 * IN);
    let k2 = 10000.0 * KSI * 0.7854 * IN * IN / (120.0 * IN);
    let (a1, a2, c) = (48.0 * IN, 108.0 * IN, 144.0 * IN);
    let w = 6.0 * KIP;
    let theta = w * c / (k1 * a1 * a1 + k2 * a2 * a2);
    assert!(rel(force(&m, &s, "loads", "r1"), k1 * a1 * theta) < 1e-9);
    assert!(rel(force(&m, &s, "loads", "r2"), k2 * a2 * theta) < 1e-9);
    let res = &s.combinations[0];
    assert!(rel(res.rotations[0], -theta) < 1e-9);
    // the pin takes the rest: W - F1 - F2 upward
    let f1 = k1 * a1 * theta;
    let f2 = k2 * a2 * theta;
    assert!(rel(res.nodes[0].reaction[1].value, w - f1 - f2) < 1e-9);
    assert!(res.equilibrium_residual.value < 1e-9 * res.force_scale.value);
}

/// A symmetric three-wire hanger (vertical centre wire, outer wires at θ
/// from vertical, same E A, outer length L/cos θ): the centre wire carries
/// P / (1 + 2 cos³θ).
#[test]
fn three_wire_hanger() {
    let text = "
material wire { E = 29000 ksi }
let h = 6 ft
let spread = 4 ft
node load_pt at (0 ft, 0 ft)
node top_l at (-spread, h)
node top_c at (0 ft, h)
node top_r at (spread, h)
fix top_l, top_c, top_r
part left { material = wire; area = 0.2 in^2; ends = load_pt, top_l; carries = tension }
part centre { material = wire; area = 0.2 in^2; ends = load_pt, top_c; carries = tension }
part right { material = wire; area = 0.2 in^2; ends = load_pt, top_r; carries = tension }
load load_pt = (0 kip, -9 kip)
";
    let (m, s) = solve(text);
    let cos = 6.0 / (36.0f64 + 16.0).sqrt();
    let p = 9.0 * KIP;
    assert!(
        rel(
            force(&m, &s, "loads", "centre"),
            p / (1.0 + 2.0 * cos.powi(3))
        ) < 1e-9
    );
    assert!(
        rel(
            force(&m, &s, "loads", "left"),
            force(&m, &s, "loads", "right")
        ) < 1e-9
    );
}

/// A bolt through a sleeve tightened by n turns of pitch p:
/// F = n p / (1/kb + 1/ks). An external separating load P then adds
/// P kb/(kb + ks) to the bolt until the sleeve lets go, after which the bolt
/// carries P alone.
#[test]
fn bolt_and_sleeve_turn_of_nut_and_separation() {
    let text = "
let pitch = 0.1 in
material steel { E = 29000 ksi }
node head at 0 in
node nut at 4 in
fix head
part bolt { material = steel; area = 0.334 in^2; ends = head, nut; misfit = -pitch / 3; carries = tension }
part sleeve { material = steel; area = 0.627 in^2; ends = head, nut; carries = compression }
case clamp { }
case pull { load nut = 8 kip }
case surge { load nut = 120 kip }
";
    let (m, s) = solve(text);
    let kb = 29000.0 * KSI * 0.334 * IN * IN / (4.0 * IN);
    let ks = 29000.0 * KSI * 0.627 * IN * IN / (4.0 * IN);
    let f0 = (0.1 * IN / 3.0) / (1.0 / kb + 1.0 / ks);
    assert!(rel(force(&m, &s, "clamp", "bolt"), f0) < 1e-9);
    assert!(rel(force(&m, &s, "clamp", "sleeve"), -f0) < 1e-9);
    let p = 8.0 * KIP;
    assert!(rel(force(&m, &s, "pull", "bolt"), f0 + p * kb / (kb + ks)) < 1e-9);
    assert!(rel(force(&m, &s, "pull", "sleeve"), -f0 + p * ks / (kb + ks)) < 1e-9);
    // separation at P = F0 (1 + kb/ks)... past it the sleeve is slack
    let p = 120.0 * KIP;
    assert!(p > f0 * (kb + ks) / ks);
    assert!(rel(force(&m, &s, "surge", "bolt"), p) < 1e-9);
    assert_eq!(force(&m, &s, "surge", "sleeve"), 0.0);
}

/// Settlement of one support of a two-span chain: the force is k_series × s.
#[test]
fn support_settlement() {
    let text = "
material steel { E = 29000 ksi }
node a at 0 in
node b at 50 in
node c at 100 in
fix a, c
part p1 { material = steel; area = 1 in^2; ends = a, b }
part p2 { material = steel; area = 2 in^2; ends = b, c }
settle c = 0.05 in
";
    let (m, s) = solve(text);
    let k1 = 29000.0 * KSI * IN * IN / (50.0 * IN);
    let k2 = 2.0 * k1;
    let n = 0.05 * IN / (1.0 / k1 + 1.0 / k2);
    assert!(rel(force(&m, &s, "loads", "p1"), n) < 1e-9);
    assert!(rel(force(&m, &s, "loads", "p2"), n) < 1e-9);
}

#[test]
fn unsupported_chain_is_a_mechanism() {
    let text = "
material steel { E = 29000 ksi }
node a at 0 in
node b at 50 in
part p1 { material = steel; area = 1 in^2; ends = a, b }
load b = 1 kip
";
    let err = solve_err(text);
    assert!(err.contains("mechanism") && err.contains("node `"), "{err}");
    assert!(err.contains("fix"), "{err}");
}

#[test]
fn collinear_plane_node_is_a_mechanism() {
    let text = "
material steel { E = 29000 ksi }
node a at (0 ft, 0 ft)
node b at (10 ft, 0 ft)
node c at (20 ft, 0 ft)
fix a, c
part p1 { material = steel; area = 1 in^2; ends = a, b }
part p2 { material = steel; area = 1 in^2; ends = b, c }
load b = (0 kip, -1 kip)
";
    let err = solve_err(text);
    assert!(err.contains("node `b` in y can move freely"), "{err}");
}

#[test]
fn unsupported_rigid_body_is_a_mechanism() {
    let text = "
material steel { E = 29000 ksi }
node a at (0 ft, 0 ft)
node b at (10 ft, 0 ft)
node t at (0 ft, 5 ft)
fix t
rigid beam { nodes = a, b }
part hanger { material = steel; area = 1 in^2; ends = a, t }
load b = (0 kip, -1 kip)
";
    let err = solve_err(text);
    assert!(err.contains("rigid body `beam`"), "{err}");
}

#[test]
fn slack_rod_leaves_a_mechanism() {
    let text = "
material steel { E = 29000 ksi }
node top at 0 in
node bot at -40 in
fix top
part rod { material = steel; area = 1 in^2; ends = bot, top; carries = tension }
load bot = 5 kip
";
    let err = solve_err(text);
    assert!(
        err.contains("once `rod` goes slack") || err.contains("rod"),
        "{err}"
    );
}

/// Stiffnesses 1e13 apart give a precision warning (common practice: a
/// double-precision solve keeps about 16 digits; beyond a 1e12 spread the
/// soft part's share loses most of them).
#[test]
fn stiffness_spread_is_warned() {
    let text = "
node a at 0 in
node b at 0 in
node c at 0 in
fix a
part soft { stiffness = 1e-6 kip/in; ends = a, b }
part stiff { stiffness = 1e7 kip/in; ends = b, c }
part tie_back { stiffness = 1 kip/in; ends = a, c }
load c = 1 kip
";
    let (_, s) = solve(text);
    assert!(
        s.warnings
            .iter()
            .any(|w| w.to_string().contains("differ by a factor")),
        "{:?}",
        s.warnings
    );
    let text_ok = text.replace("1e-6 kip/in", "1 kip/in");
    let (_, s) = solve(&text_ok);
    assert!(s.warnings.is_empty());
}

/// A rigid beam pinned at one end on a roller at the other that settles by
/// s: the beam rotates θ = −s/L about the pin (rigid-body kinematics), so a
/// vertical rod hung at mid-span stretches by s/2 and carries k·s/2.
#[test]
fn settlement_of_a_rigid_body_support() {
    let text = "
material steel { E = 29000 ksi }
node pin at (0 in, 0 in)
node mid at (60 in, 0 in)
node end at (120 in, 0 in)
node top at (60 in, 48 in)
fix pin
fix end y
fix top
rigid beam { nodes = pin, mid, end }
part rod { material = steel; area = 0.5 in^2; ends = mid, top }
settle end y = -0.12 in
";
    let (m, s) = solve(text);
    let k = 29000.0 * KSI * 0.5 * IN * IN / (48.0 * IN);
    assert!(rel(force(&m, &s, "loads", "rod"), k * 0.06 * IN) < 1e-9);
    let r = &s.combinations[0];
    assert!(rel(r.rotations[0], -0.12 / 120.0) < 1e-9);
    assert!(rel(r.nodes[1].displacement[1].value, -0.06 * IN) < 1e-9);
    assert!(r.equilibrium_residual.value < 1e-9 * r.force_scale.value);
}

/// A tie carries a support movement across: node b tied to a support that
/// moves 0.1 in toward the far support shortens the part b–c by 0.1 in.
#[test]
fn settlement_through_a_tie() {
    let text = "
material steel { E = 29000 ksi }
node a at 0 in
node b at 0 in
node c at 50 in
fix a, c
tie a, b
part p { material = steel; area = 1 in^2; ends = b, c }
settle a = 0.1 in
";
    let (m, s) = solve(text);
    let k = 29000.0 * KSI * IN * IN / (50.0 * IN);
    assert!(rel(force(&m, &s, "loads", "p"), -k * 0.1 * IN) < 1e-9);
    let r = &s.combinations[0];
    assert!(rel(r.nodes[0].reaction[0].value, k * 0.1 * IN) < 1e-9);
}

/// Support movements that no rigid motion can follow are refused.
#[test]
fn conflicting_settlements_on_a_rigid_body() {
    let text = "
material steel { E = 29000 ksi }
node a at (0 in, 0 in)
node b at (60 in, 0 in)
node c at (120 in, 0 in)
node top at (60 in, 48 in)
fix a
fix b y
fix c y
fix top
rigid beam { nodes = a, b, c }
part rod { material = steel; area = 0.5 in^2; ends = b, top }
settle c y = -0.12 in
";
    let err = solve_err(text);
    assert!(err.contains("do not fit together"), "{err}");
}

/// The order of a part's `ends` against the axis must not change its
/// force: a hanger below its support carries the weight hung on it in
/// tension (statics of a free body, F = P), whether it is written from the
/// support down or from the load up, and with the axis pointing up or down.
/// Two unequal hangers side by side share it by E A / L (parallel springs).
#[test]
fn a_hanger_is_in_tension_whatever_the_order_of_its_ends() {
    let forms = [
        // axis up, ends from the support down
        (
            "node roof at 0 in\nnode grid at -40 in",
            "roof, grid",
            "roof, grid",
            -6.0,
        ),
        // axis up, ends from the load up
        (
            "node roof at 0 in\nnode grid at -40 in",
            "grid, roof",
            "roof, grid",
            -6.0,
        ),
        // axis down (positions grow downward), one hanger each way
        (
            "node roof at 0 in\nnode grid at 40 in",
            "roof, grid",
            "grid, roof",
            6.0,
        ),
    ];
    for (nodes, rod, strap, load) in forms {
        let text = format!(
            "material steel {{ E = 29000 ksi; alpha = 6.5e-6 / degF }}
material alu {{ E = 10000 ksi; alpha = 12.8e-6 / degF }}
{nodes}
fix roof
part rod {{ material = steel; area = 0.5 in^2; ends = {rod}; carries = tension }}
part strap {{ material = alu; area = 0.75 in^2; ends = {strap}; carries = tension }}
case dead {{ load grid = {load} kip }}
case cold {{ temperature = -60 degF }}
combine hung = dead
combine chilled = dead + cold
"
        );
        let (m, s) = solve(&text);
        let (ka, kb) = (29000.0 * 0.5, 10000.0 * 0.75);
        let p = 6.0 * KIP;
        let rod = force(&m, &s, "hung", "rod");
        let strap = force(&m, &s, "hung", "strap");
        assert!(
            rel(rod, p * ka / (ka + kb)) < 1e-9,
            "{nodes} / {rod}: {rod}"
        );
        assert!(rel(strap, p * kb / (ka + kb)) < 1e-9, "{nodes}: {strap}");
        // Cooling shortens the aluminium more: it takes more of the load,
        // by (α_s − α_a) ΔT L / (1/k_s + 1/k_a) (two-material closed form).
        let l = 40.0 * IN;
        let (k1, k2) = (ka * KSI * IN * IN / l, kb * KSI * IN * IN / l);
        let dt = -60.0 * 5.0 / 9.0;
        let (a1, a2) = (6.5e-6 * 9.0 / 5.0, 12.8e-6 * 9.0 / 5.0);
        let locked = (a2 - a1) * dt * l / (1.0 / k1 + 1.0 / k2);
        let strap_cold = force(&m, &s, "chilled", "strap");
        assert!(
            rel(strap_cold, p * kb / (ka + kb) - locked) < 1e-9,
            "{nodes}: {strap_cold}"
        );
    }
}

/// A rigid beam hung from three vertical rods at x₁, x₂, x₃, the middle one
/// with a gap g, free to move vertically and rotate. Rigid-body kinematics
/// and equilibrium (mechanics of materials, rigid bar on elastic supports):
/// rod i stretches u + t·xᵢ, so with the gap closed
/// [Σk, Σkx; Σkx, Σkx²]·[u; t] = [W + k₂g; M + k₂x₂g], solved by Cramer's
/// rule. With a light load the middle rod stays slack and the outer two
/// carry the load by statics alone (lever rule).
#[test]
fn rigid_beam_on_three_rods_one_with_a_gap() {
    let text = "
material steel { E = 29000 ksi }
material stainless { E = 28000 ksi }
node top_a at (0 in, 100 in)
node top_b at (50 in, 80 in)
node top_c at (120 in, 100 in)
node a at (0 in, 0 in)
node b at (50 in, 0 in)
node c at (120 in, 0 in)
fix top_a, top_b, top_c
fix a x
rigid beam { nodes = a, b, c }
part ra { material = steel; area = 0.3 in^2; ends = top_a, a; carries = tension }
part rb { material = stainless; area = 0.3 in^2; ends = top_b, b; carries = tension; slack = 0.04 in }
part rc { material = steel; area = 0.3 in^2; ends = top_c, c; carries = tension }
case heavy { load b = (0 kip, -4 kip); load c = (0 kip, -6 kip) }
case light { load b = (0 kip, -1 kip) }
";
    let (m, s) = solve(text);
    let k = |e: f64, l: f64| e * KSI * 0.3 * IN * IN / (l * IN);
    let (ka, kb, kc) = (k(29000.0, 100.0), k(28000.0, 80.0), k(29000.0, 100.0));
    let (xa, xb, xc) = (0.0, 50.0 * IN, 120.0 * IN);
    let g = 0.04 * IN;

    // heavy: every rod engaged
    let w = 10.0 * KIP;
    let mo = 4.0 * KIP * xb + 6.0 * KIP * xc;
    let s0 = ka + kb + kc;
    let s1 = ka * xa + kb * xb + kc * xc;
    let s2 = ka * xa * xa + kb * xb * xb + kc * xc * xc;
    let (r0, r1) = (w + kb * g, mo + kb * xb * g);
    let det = s0 * s2 - s1 * s1;
    let u = (r0 * s2 - s1 * r1) / det;
    let t = (s0 * r1 - s1 * r0) / det;
    assert!(u + t * xb > g, "the gap closes in this scenario");
    assert!(rel(force(&m, &s, "heavy", "ra"), ka * (u + t * xa)) < 1e-9);
    assert!(rel(force(&m, &s, "heavy", "rb"), kb * (u + t * xb - g)) < 1e-9);
    assert!(rel(force(&m, &s, "heavy", "rc"), kc * (u + t * xc)) < 1e-9);

    // light: 1 kip at b, lever rule between a and c
    let p = KIP;
    assert!(rel(force(&m, &s, "light", "rc"), p * xb / xc) < 1e-9);
    assert!(rel(force(&m, &s, "light", "ra"), p * (xc - xb) / xc) < 1e-9);
    assert_eq!(force(&m, &s, "light", "rb"), 0.0);
    // and the middle rod's end has not moved down as far as its gap
    let ua = p * (xc - xb) / xc / ka;
    let uc = p * xb / xc / kc;
    assert!(ua + (uc - ua) * xb / xc < g);
}
