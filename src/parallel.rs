//! The one way work is spread over the cores: rayon's pool, in contiguous
//! runs joined back in order, so that results and errors keep file order
//! whatever the number of cores.

use rayon::prelude::*;

/// How many runs to cut `len` items into: one below `threshold` items (the
/// work is too small to share), else one per thread of the pool.
pub fn runs_for(len: usize, threshold: usize) -> usize {
    if len < threshold {
        1
    } else {
        rayon::current_num_threads().max(1)
    }
}

/// `work(k, run)` on each of `runs` contiguous runs of `items`, in
/// parallel when there is more than one; the results in the runs' order.
pub fn in_runs<I: Sync, R: Send>(
    items: &[I],
    runs: usize,
    work: impl Fn(usize, &[I]) -> R + Sync + Send,
) -> Vec<R> {
    if runs <= 1 || items.len() < 2 {
        return vec![work(0, items)];
    }
    let per = items.len().div_ceil(runs).max(1);
    items
        .par_chunks(per)
        .enumerate()
        .map(|(k, run)| work(k, run))
        .collect()
}

/// `work(k)` for `k` in `0..count`, in parallel; the results in order.
pub fn each<R: Send>(count: usize, work: impl Fn(usize) -> R + Sync + Send) -> Vec<R> {
    if count <= 1 {
        return (0..count).map(work).collect();
    }
    (0..count).into_par_iter().map(work).collect()
}

/// `work` on each item, in parallel; the results in the items' order.
pub fn map<I: Sync, R: Send>(items: &[I], work: impl Fn(&I) -> R + Sync + Send) -> Vec<R> {
    items.par_iter().map(work).collect()
}

/// `work(state, k)` for `k` in `0..count`, in parallel, each index worked
/// with one of `states` (a model updated in place, so a state must give
/// the same result whatever it worked before); the results in order.
///
/// The indices are cut into short runs that each state's task takes in
/// turn from a shared counter until none are left: a core that is slowed
/// (a neighbour's load on a shared machine) takes fewer runs rather than
/// holding the others back to its pace.
pub fn each_with<S: Send, R: Send>(
    states: &mut [S],
    count: usize,
    work: impl Fn(&mut S, usize) -> R + Sync + Send,
) -> Vec<R> {
    use std::sync::atomic::{AtomicUsize, Ordering};
    let tasks = states.len().clamp(1, count.max(1));
    // about eight runs per task (common practice for dynamic scheduling)
    let per = count.div_ceil(tasks * RUNS_PER_TASK).max(1);
    let runs = count.div_ceil(per);
    let next = AtomicUsize::new(0);
    let done: Vec<Vec<(usize, Vec<R>)>> = states[..tasks]
        .par_iter_mut()
        .map(|s| {
            let mut mine = Vec::new();
            loop {
                let r = next.fetch_add(1, Ordering::Relaxed);
                if r >= runs {
                    break mine;
                }
                let lo = r * per;
                let hi = (lo + per).min(count);
                mine.push((r, (lo..hi).map(|i| work(s, i)).collect()));
            }
        })
        .collect();
    let mut ordered: Vec<Option<Vec<R>>> = (0..runs).map(|_| None).collect();
    for (r, out) in done.into_iter().flatten() {
        ordered[r] = Some(out);
    }
    ordered.into_iter().flatten().flatten().collect()
}

/// How many runs [`each_with`] cuts its indices into per state.
const RUNS_PER_TASK: usize = 8;
