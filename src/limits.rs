//! Resource limits shared by every entry point: a time limit per thread,
//! checked cheaply in the loops that can run long (summations, exact
//! symbol sums, the simplification driver, the matcher, the sampler).
//!
//! The limit is cooperative and scoped: `within_time_limit` runs a closure
//! with a deadline; when a loop inside notices the deadline has passed it
//! unwinds with a private payload, and `within_time_limit` turns that back
//! into `Err(TimeUp)`. Outside such a scope `tick` never stops anything, so
//! library callers that set no limit are never interrupted.

use std::cell::Cell;
use std::time::{Duration, Instant};

/// The time limit was reached.
#[derive(Debug, Clone, Copy, PartialEq, thiserror::Error)]
#[error("the time limit of {seconds} s was reached")]
pub struct TimeUp {
    /// the limit that was in force, in seconds
    pub seconds: f64,
}

thread_local! {
    static DEADLINE: Cell<Option<(Instant, f64)>> = const { Cell::new(None) };
    static TICKS: Cell<u32> = const { Cell::new(0) };
}

/// The unwinding payload that carries a `TimeUp` out of deep loops.
struct Unwind(TimeUp);

fn install_quiet_hook() {
    static ONCE: std::sync::Once = std::sync::Once::new();
    ONCE.call_once(|| {
        let previous = std::panic::take_hook();
        std::panic::set_hook(Box::new(move |info| {
            if info.payload().downcast_ref::<Unwind>().is_none() {
                previous(info);
            }
        }));
    });
}

/// Checks the deadline now (not only every few thousand calls); unwinds
/// to the enclosing `within_time_limit` when it has passed.
pub fn check_now() {
    if let Some((deadline, seconds)) = DEADLINE.with(|d| d.get()) {
        if Instant::now() >= deadline {
            std::panic::resume_unwind(Box::new(Unwind(TimeUp { seconds })));
        }
    }
}

/// A cheap check for inner loops: reads the clock once every 1024 calls.
#[inline]
pub fn tick() {
    let n = TICKS.with(|t| {
        let n = t.get().wrapping_add(1);
        t.set(n);
        n
    });
    if n & 1023 == 0 {
        check_now();
    }
}

/// Seconds left before the deadline on this thread (`None`: no deadline).
pub fn seconds_left() -> Option<f64> {
    DEADLINE
        .with(|d| d.get())
        .map(|(at, _)| at.saturating_duration_since(Instant::now()).as_secs_f64())
}

/// True when a deadline is in force on this thread.
pub fn has_deadline() -> bool {
    DEADLINE.with(|d| d.get().is_some())
}

/// Runs `f` with a time limit of `seconds` (none when `None`); nested
/// scopes keep the earlier deadline.
pub fn within_time_limit<R>(seconds: Option<f64>, f: impl FnOnce() -> R) -> Result<R, TimeUp> {
    install_quiet_hook();
    let previous = DEADLINE.with(|d| d.get());
    let mine = seconds.map(|s| {
        let dur = Duration::try_from_secs_f64(s.max(0.0)).unwrap_or(Duration::from_secs(1 << 40));
        let at = Instant::now()
            .checked_add(dur)
            .unwrap_or_else(|| Instant::now() + Duration::from_secs(1 << 30));
        (at, s)
    });
    let chosen = match (previous, mine) {
        (Some(p), Some(m)) => Some(if p.0 <= m.0 { p } else { m }),
        (p, m) => p.or(m),
    };
    DEADLINE.with(|d| d.set(chosen));
    let result = std::panic::catch_unwind(std::panic::AssertUnwindSafe(f));
    DEADLINE.with(|d| d.set(previous));
    match result {
        Ok(r) => Ok(r),
        Err(payload) => match payload.downcast::<Unwind>() {
            Ok(u) => Err(u.0),
            Err(other) => std::panic::resume_unwind(other),
        },
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_loop_past_its_deadline_stops_with_time_up() {
        let r = within_time_limit(Some(0.05), || loop {
            tick();
        });
        assert_eq!(r, Err(TimeUp { seconds: 0.05 }));
        // outside the scope nothing is stopped
        for _ in 0..5000 {
            tick();
        }
        assert!(!has_deadline());
    }

    #[test]
    fn work_within_the_limit_returns_its_value() {
        assert_eq!(within_time_limit(Some(10.0), || 7), Ok(7));
        assert_eq!(within_time_limit(None, || 8), Ok(8));
    }
}
