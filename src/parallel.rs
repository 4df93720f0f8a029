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

/// `work(state, k)` for `k` in `0..count`, in parallel: the indices cut
/// into one contiguous run per state, each run worked with its own state
/// (a model updated in place); the results in order.
pub fn each_with<S: Send, R: Send>(
    states: &mut [S],
    count: usize,
    work: impl Fn(&mut S, usize) -> R + Sync + Send,
) -> Vec<R> {
    let runs = states.len().clamp(1, count.max(1));
    let per = count.div_ceil(runs).max(1);
    let parts: Vec<Vec<R>> = states[..runs]
        .par_iter_mut()
        .enumerate()
        .map(|(k, s)| {
            let lo = (k * per).min(count);
            let hi = ((k + 1) * per).min(count);
            (lo..hi).map(|i| work(s, i)).collect()
        })
        .collect();
    parts.into_iter().flatten().collect()
}
