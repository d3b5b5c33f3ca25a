//! Sharing one evaluation of many analytes between the machine's cores: the items are cut into
//! one contiguous chunk per thread and the results are gathered in item order, so the output
//! is the same whatever the number of cores. Small inputs stay on the calling thread.

/// From this many items on, the work is shared between threads.
const PARALLEL_FROM: usize = 4096;

/// At most this many threads.
const MAX_THREADS: usize = 8;

/// `f(index, item)` for every item, in item order; None as soon as one gives None.
pub(crate) fn map_in_order<T, R, F>(items: &[T], f: F) -> Option<Vec<R>>
where
    T: Sync,
    R: Send,
    F: Fn(usize, &T) -> Option<R> + Sync,
{
    let n = items.len();
    let threads = if n >= PARALLEL_FROM {
        std::thread::available_parallelism()
            .map_or(1, usize::from)
            .min(MAX_THREADS)
    } else {
        1
    };
    if threads <= 1 {
        return items.iter().enumerate().map(|(i, x)| f(i, x)).collect();
    }
    let chunk = n.div_ceil(threads);
    let f = &f;
    let parts: Vec<Option<Vec<R>>> = std::thread::scope(|scope| {
        let handles: Vec<_> = items
            .chunks(chunk)
            .enumerate()
            .map(|(c, part)| {
                scope.spawn(move || {
                    part.iter()
                        .enumerate()
                        .map(|(j, x)| f(c * chunk + j, x))
                        .collect::<Option<Vec<R>>>()
                })
            })
            .collect();
        handles
            .into_iter()
            .map(|h| match h.join() {
                Ok(v) => v,
                Err(payload) => std::panic::resume_unwind(payload),
            })
            .collect()
    });
    let mut out = Vec::with_capacity(n);
    for part in parts {
        out.extend(part?);
    }
    Some(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn results_come_in_item_order_on_any_path() {
        for n in [
            0,
            3,
            PARALLEL_FROM - 1,
            PARALLEL_FROM,
            3 * PARALLEL_FROM + 7,
        ] {
            let items: Vec<u64> = (0..n as u64).collect();
            let out = map_in_order(&items, |i, x| Some((i as u64) * 1000 + x)).unwrap();
            assert_eq!(out.len(), n);
            assert!(out.iter().enumerate().all(|(i, v)| *v == i as u64 * 1001));
        }
    }

    #[test]
    fn one_failure_fails_the_whole_map() {
        let items: Vec<usize> = (0..2 * PARALLEL_FROM).collect();
        assert!(map_in_order(&items, |i, _| (i != PARALLEL_FROM + 5).then_some(i)).is_none());
        assert!(map_in_order(&items[..10], |i, _| (i != 3).then_some(i)).is_none());
    }
}
