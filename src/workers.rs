//! Independent pieces of work spread over the machine's cores.

use std::sync::atomic::{AtomicUsize, Ordering};

/// `work(i, state)` for every `i` in `0..n`, on as many threads as there are cores (the calling
/// thread one of them), each thread with its own `state` from `new_state`; the results in order
/// of `i`, whichever thread worked each out.
pub fn in_order<S, T: Send>(n: usize, new_state: impl Fn() -> S + Sync, work: impl Fn(usize, &mut S) -> T + Sync) -> Vec<T> {
    let threads = std::thread::available_parallelism().map_or(1, |c| c.get()).min(n).max(1);
    let next = AtomicUsize::new(0);
    let run = || {
        let mut state = new_state();
        let mut done = Vec::new();
        loop {
            let i = next.fetch_add(1, Ordering::Relaxed);
            if i >= n {
                return done;
            }
            done.push((i, work(i, &mut state)));
        }
    };
    let mut out: Vec<Option<T>> = (0..n).map(|_| None).collect();
    std::thread::scope(|scope| {
        let others: Vec<_> = (1..threads).map(|_| scope.spawn(run)).collect();
        for (i, t) in run() {
            out[i] = Some(t);
        }
        for h in others {
            for (i, t) in h.join().expect("a worker thread does not panic") {
                out[i] = Some(t);
            }
        }
    });
    out.into_iter().map(|t| t.expect("every piece worked out")).collect()
}

#[cfg(test)]
mod tests {
    #[test]
    fn results_come_back_in_order_with_a_state_per_thread() {
        // common practice, no source: the order of the results is that of the pieces
        let squares = super::in_order(50, || 0usize, |i, done| {
            *done += 1;
            (i * i, *done)
        });
        assert_eq!(squares.iter().map(|s| s.0).collect::<Vec<_>>(), (0..50).map(|i| i * i).collect::<Vec<_>>());
        // Each thread that got work counts from 1 in its own state.
        let firsts = squares.iter().filter(|s| s.1 == 1).count();
        assert!((1..=std::thread::available_parallelism().map_or(1, |c| c.get())).contains(&firsts), "one state per thread: {firsts}");
        assert!(super::in_order(0, || (), |i, _| i).is_empty());
    }
}
