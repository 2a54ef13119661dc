//! Demo: a gateway watching a fleet of devices for silences that are too
//! long for the rate each device has shown.
//!
//! Invented scenario: the Tallowmere cold-store has 24 wireless door and
//! temperature nodes. Each node reports at random (a Poisson stream) at its
//! own rate, from one report every 10 s (busy loading-bay doors) to one
//! every 20 min (a rarely opened freezer). Over two simulated days:
//! * node 5's battery dies on day 1 at 15:00;
//! * node 17 (about one report every 6 min) drops off the radio for 4 hours
//!   from 08:00 on day 2, then comes back;
//! * node 11 is a sluggish freezer door whose rate halves on day 2 (it is
//!   not broken: the budget follows because the rate is re-learned).
//!
//! The gateway keeps one `SilenceFleet` (16 bytes per node) with a plan of
//! one false silence per million gaps, learns each node's rate from its own
//! gaps, and sleeps until the next report or the fleet's next deadline,
//! whichever comes first.
//!
//! Run: `cargo run --example fleet_silence_watch`

use countward::Ticks;
use countward::detect::{SilenceFleet, SilencePlan};
use countward::ticks::NextDeadline;
use rand::SeedableRng;
use rand::rngs::SmallRng;
use rand_distr::{Distribution, Exp};

const NODES: usize = 24;
const DAY_S: u32 = 86_400;

fn when(t: u32) -> String {
    format!(
        "day {} {:02}:{:02}:{:02}",
        t / DAY_S + 1,
        t % DAY_S / 3600,
        t / 60 % 60,
        t % 60
    )
}

fn main() -> Result<(), countward::Error> {
    let mut rng = SmallRng::seed_from_u64(7_340_021);
    // Mean seconds between reports, node by node (10 s to 20 min).
    let mean_gap_s: Vec<f64> = (0..NODES)
        .map(|i| 10.0 * (120.0f64).powf(i as f64 / (NODES - 1) as f64))
        .collect();
    let horizon = 2 * DAY_S;
    let mut reports: Vec<(u32, usize)> = Vec::new();
    for (node, &gap) in mean_gap_s.iter().enumerate() {
        let mut t = 0.0;
        loop {
            let slow_down = if node == 11 && t > f64::from(DAY_S) {
                2.0
            } else {
                1.0
            };
            t += Exp::new(1.0 / (gap * slow_down)).unwrap().sample(&mut rng);
            if t >= f64::from(horizon) {
                break;
            }
            let s = t as u32;
            let battery_dead = node == 5 && s >= 15 * 3600;
            let off_radio = node == 17 && (DAY_S + 8 * 3600..DAY_S + 12 * 3600).contains(&s);
            if !battery_dead && !off_radio {
                reports.push((s, node));
            }
        }
    }
    reports.sort_unstable();

    // One false silence per million gaps per node; budgets once 6 gaps are
    // learned, a fixed 2 h budget before that; rates learned over 16..32 gaps.
    let alpha = 1e-6;
    let plan = SilencePlan::<32>::new(alpha, 6, 7_200)?;
    let mut fleet = SilenceFleet::<NODES, 32>::new(plan);
    println!(
        "Tallowmere cold-store gateway: {NODES} nodes, {} reports over two simulated days",
        reports.len()
    );
    println!("silence plan: one false silence per million gaps per node, rate learned per node\n");

    let (mut wakeups, mut next_report, mut watched_gaps) = (0u32, 0usize, 0u64);
    let mut now = 0u32;
    while now < horizon {
        // Sleep until the next report or the fleet's next deadline.
        let report_at = reports.get(next_report).map_or(horizon, |r| r.0);
        let deadline_at = fleet.next_deadline().map_or(horizon, |d| d.0);
        now = report_at.min(deadline_at).max(now);
        if now >= horizon {
            break;
        }
        wakeups += 1;
        while let Some(node) = fleet.next_silent(Ticks(now)) {
            let (gaps, sum) = fleet.slot(node).map(|s| s.learned()).unwrap_or((0, 0));
            let last = fleet
                .slot(node)
                .and_then(|s| s.last_event())
                .map_or(0, |t| t.0);
            println!(
                "{}  node {node:2} SILENT: {} s since its last report (learned mean gap {:.0} s over {gaps} gaps)",
                when(now),
                now - last,
                f64::from(sum) / f64::from(gaps.max(1)),
            );
        }
        while let Some(&(t, node)) = reports.get(next_report) {
            if t > now {
                break;
            }
            watched_gaps += u64::from(fleet.slot(node).is_some_and(|s| s.learned().0 >= 6));
            if fleet.event(node, Ticks(t))? {
                println!("{}  node {node:2} reports again", when(t));
            }
            next_report += 1;
        }
    }
    println!(
        "\n{watched_gaps} gaps were watched with a learned budget: {:.3} false silences expected from the plan",
        alpha * watched_gaps as f64
    );
    println!(
        "{wakeups} gateway wake-ups for {} reports: it slept between them and woke early only for deadlines",
        reports.len()
    );
    Ok(())
}
