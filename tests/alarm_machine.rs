//! The alarm state machine: no alarm is ever lost, whatever the input and
//! however the application polls and acknowledges (property tests over
//! arbitrary sequences), plus unit checks of persistence and hysteresis.

use countward::Ticks;
use countward::alarm::{AlarmConfig, AlarmMachine, EventKind, Fault, Faults, Level};
use countward::detect::Classification;
use countward::ticks::NextDeadline;
use proptest::prelude::*;

fn level(i: u8) -> Level {
    match i % 3 {
        0 => Level::Normal,
        1 => Level::Warning,
        _ => Level::Alarm,
    }
}

#[derive(Debug, Clone)]
enum Op {
    Tick {
        raise: u8,
        extra_hold: u8,
        low: bool,
        faults: u8,
    },
    Poll,
    Ack,
}

fn op() -> impl Strategy<Value = Op> {
    prop_oneof![
        6 => (0u8..3, 0u8..3, any::<bool>(), 0u8..16).prop_map(|(raise, extra_hold, low, faults)| Op::Tick { raise, extra_hold, low, faults }),
        2 => Just(Op::Poll),
        1 => Just(Op::Ack),
    ]
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(600))]

    #[test]
    fn no_alarm_is_lost(
        persist in (1u16..4, 1u16..4, 1u16..3, 1u16..3),
        ops in prop::collection::vec(op(), 1..300),
    ) {
        let config = AlarmConfig::new(persist.0, persist.1, persist.2, persist.3).unwrap();
        let mut m = AlarmMachine::<4>::new(config);
        // A twin with room for every event, fed the same inputs and drained
        // only at the end: the reference sequence of events.
        let mut twin = AlarmMachine::<2048>::new(config);
        let mut seen = Vec::new(); // events the small machine delivered, in order
        let mut t = 0u32;
        let mut max_since_ack = Level::Normal;
        let mut faults_since_ack = Faults::NONE;
        let mut generated = 0u64;
        let mut delivered = 0u64;
        let mut raised_alarm_generated = 0u64;
        let mut raised_alarm_delivered = 0u64;
        for op in ops {
            match op {
                Op::Tick { raise, extra_hold, low, faults } => {
                    let (before_level, before_faults) = (m.active(), m.active_faults());
                    let raise = level(raise);
                    let hold = raise.max(level(raise as u8 + extra_hold));
                    let c = Classification { raise, hold, low_raise: low, low_hold: low || extra_hold > 0 };
                    let mut f = Faults::NONE;
                    for (i, x) in Fault::ALL.into_iter().enumerate().skip(1) {
                        f = f.with(x, faults & (1 << i) != 0);
                    }
                    m.update(Ticks(t), c, f);
                    twin.update(Ticks(t), c, f);
                    t += 1;
                    if m.active() != before_level {
                        generated += 1;
                        if m.active() == Level::Alarm { raised_alarm_generated += 1; }
                    }
                    generated += u64::from((m.active_faults().bits() ^ before_faults.bits()).count_ones());
                    max_since_ack = max_since_ack.max(m.active());
                    faults_since_ack = faults_since_ack.union(m.active_faults());
                }
                Op::Poll => {
                    while let Some(e) = m.poll_event() {
                        seen.push(e);
                        delivered += 1;
                        if e.kind == EventKind::Raised(Level::Alarm) { raised_alarm_delivered += 1; }
                    }
                }
                Op::Ack => {
                    m.acknowledge(Ticks(t));
                    twin.acknowledge(Ticks(t));
                    generated += 1;
                    max_since_ack = m.active();
                    faults_since_ack = m.active_faults();
                }
            }
            // Latched holds everything active since the last acknowledgement.
            prop_assert!(m.latched() >= m.active());
            prop_assert_eq!(m.latched(), max_since_ack);
            prop_assert_eq!(m.latched_faults(), faults_since_ack);
            // Every event is delivered, queued or counted as dropped.
            prop_assert_eq!(generated, delivered + m.queued_events() as u64 + u64::from(m.dropped_events()));
            // A raised alarm is delivered, still queued, or its loss is counted.
            prop_assert!(raised_alarm_delivered <= raised_alarm_generated);
            if raised_alarm_delivered < raised_alarm_generated {
                prop_assert!(m.queued_events() > 0 || m.dropped_events() > 0);
            }
        }
        // Identity, not just counts: what the small queue delivered (polled
        // along the way, then drained) is the twin's full sequence with
        // exactly `dropped_events()` events missing and nothing reordered or
        // invented — so a lost alarm cannot hide behind another queued event.
        while let Some(e) = m.poll_event() {
            seen.push(e);
        }
        let mut reference = Vec::new();
        while let Some(e) = twin.poll_event() {
            reference.push(e);
        }
        prop_assert_eq!(twin.dropped_events(), 0);
        prop_assert_eq!(reference.len(), seen.len() + m.dropped_events() as usize);
        let mut it = reference.iter();
        for e in &seen {
            prop_assert!(it.any(|r| r == e), "{:?} delivered out of order or invented", e);
        }
        if m.dropped_events() == 0 {
            prop_assert_eq!(&seen, &reference);
        }
    }
}

fn tick(m: &mut AlarmMachine<16>, t: u32, raise: Level, hold: Level) {
    m.update(
        Ticks(t),
        Classification {
            raise,
            hold,
            low_raise: false,
            low_hold: false,
        },
        Faults::NONE,
    );
}

#[test]
fn a_short_alarm_between_polls_stays_latched() {
    let mut m = AlarmMachine::<16>::new(AlarmConfig::new(1, 1, 1, 1).unwrap());
    tick(&mut m, 0, Level::Alarm, Level::Alarm);
    tick(&mut m, 1, Level::Normal, Level::Normal);
    assert_eq!(m.active(), Level::Normal);
    assert_eq!(m.latched(), Level::Alarm);
    let kinds: Vec<_> = std::iter::from_fn(|| m.poll_event())
        .map(|e| (e.at, e.kind))
        .collect();
    assert_eq!(
        kinds,
        [
            (Ticks(0), EventKind::Raised(Level::Alarm)),
            (
                Ticks(1),
                EventKind::Lowered {
                    from: Level::Alarm,
                    to: Level::Normal
                }
            )
        ]
    );
}

#[test]
fn persistence_and_hysteresis() {
    let mut m = AlarmMachine::<16>::new(AlarmConfig::new(3, 2, 1, 1).unwrap());
    // Two ticks above the set level are not enough.
    tick(&mut m, 0, Level::Alarm, Level::Alarm);
    tick(&mut m, 1, Level::Alarm, Level::Alarm);
    assert_eq!(m.next_deadline(), Some(Ticks(2)));
    tick(&mut m, 2, Level::Normal, Level::Normal);
    assert_eq!(m.active(), Level::Normal);
    // Three ticks, one of them only at warning: raised to warning.
    tick(&mut m, 3, Level::Alarm, Level::Alarm);
    tick(&mut m, 4, Level::Warning, Level::Warning);
    tick(&mut m, 5, Level::Alarm, Level::Alarm);
    assert_eq!(m.active(), Level::Warning);
    // Below the set level but above the clearing level: the warning holds.
    for t in 6..20 {
        tick(&mut m, t, Level::Normal, Level::Warning);
    }
    assert_eq!(m.active(), Level::Warning);
    assert_eq!(m.next_deadline(), None);
    // Below the clearing level for two ticks: cleared.
    tick(&mut m, 20, Level::Normal, Level::Normal);
    assert_eq!(m.active(), Level::Warning);
    tick(&mut m, 21, Level::Normal, Level::Normal);
    assert_eq!(m.active(), Level::Normal);
    assert_eq!(m.latched(), Level::Warning);
}

#[test]
fn faults_latch_and_clear_with_their_own_persistence() {
    let mut m = AlarmMachine::<16>::new(AlarmConfig::new(1, 1, 2, 3).unwrap());
    let sat = Faults::of(Fault::Saturated);
    let quiet = Classification::QUIET;
    m.update(Ticks(0), quiet, sat);
    assert!(m.active_faults().is_empty());
    m.update(Ticks(1), quiet, sat);
    assert!(m.active_faults().contains(Fault::Saturated));
    for t in 2..4 {
        m.update(Ticks(t), quiet, Faults::NONE);
    }
    assert!(m.active_faults().contains(Fault::Saturated));
    m.update(Ticks(4), quiet, Faults::NONE);
    assert!(m.active_faults().is_empty());
    assert!(m.latched_faults().contains(Fault::Saturated));
    m.acknowledge(Ticks(5));
    assert!(m.latched_faults().is_empty());
}

#[test]
fn overflow_is_counted() {
    let mut m = AlarmMachine::<2>::new(AlarmConfig::new(1, 1, 1, 1).unwrap());
    for t in 0..5 {
        let l = if t % 2 == 0 {
            Level::Alarm
        } else {
            Level::Normal
        };
        m.update(
            Ticks(t),
            Classification {
                raise: l,
                hold: l,
                low_raise: false,
                low_hold: false,
            },
            Faults::NONE,
        );
    }
    assert_eq!(m.queued_events(), 2);
    assert_eq!(m.dropped_events(), 3);
    assert_eq!(m.latched(), Level::Alarm);
    assert!(AlarmConfig::new(0, 1, 1, 1).is_err());
}
