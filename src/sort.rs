//! In-place heapsort with no panic path, for the few places that order data (Monte Carlo
//! coverage intervals, robust statistics of calibration frames).
//!
//! `core`'s `sort_unstable_by` and `select_nth_unstable_by` carry panic paths (a
//! comparison that is not a total order, an index past the end) that the compiler cannot
//! remove even for `total_cmp`, and the C library's link-time proof refuses any reachable
//! panic. Heapsort (Williams 1964, with Floyd's heap construction) needs no storage, is
//! O(n log n) in the worst case, and here reads and writes only through `get`, so no
//! bounds check can fail. Not stable; callers sort plain numbers.

/// Sorts `values` ascending by `less` (a strict weak order; with a comparison that is not
/// one the result is some permutation of the input, never a panic).
pub(crate) fn heapsort_by<T: Copy>(values: &mut [T], less: impl Fn(T, T) -> bool) {
    let len = values.len();
    if len < 2 {
        return;
    }
    let mut start = len / 2;
    while start > 0 {
        start -= 1;
        sift_down(values, start, len, &less);
    }
    let mut end = len;
    while end > 1 {
        end -= 1;
        swap(values, 0, end);
        sift_down(values, 0, end, &less);
    }
}

/// Reorders `values` so that the element at `k` is the one a full sort by `less` would put
/// there, none before it greater and none after it less (introselect: Hoare's quickselect,
/// Hoare 1961, with a median-of-three pivot and a three-way partition so that runs of equal
/// values cost one pass; after 2 log2(n) + 2 partitions without reaching `k` the remaining
/// range is heapsorted). O(n) on average, O(n log n) at worst, no storage, no panic path.
/// `k` past the end leaves `values` unchanged.
pub(crate) fn select_nth_by<T: Copy>(values: &mut [T], k: usize, less: impl Fn(T, T) -> bool) {
    let len = values.len();
    if k >= len {
        return;
    }
    let (mut lo, mut hi) = (0usize, len);
    let mut budget = 2 * (usize::BITS - len.leading_zeros()) + 2;
    while hi - lo > 16 && budget > 0 {
        budget -= 1;
        let mid = lo + (hi - lo) / 2;
        let (Some(&a), Some(&b), Some(&c)) = (values.get(lo), values.get(mid), values.get(hi - 1))
        else {
            return;
        };
        // The median of a, b, c.
        let pivot = if less(a, b) {
            if less(b, c) {
                b
            } else if less(a, c) {
                c
            } else {
                a
            }
        } else if less(a, c) {
            a
        } else if less(b, c) {
            c
        } else {
            b
        };
        // Dijkstra's three-way partition: [lo, lt) < pivot, [lt, gt) equal, [gt, hi) >.
        let (mut lt, mut i, mut gt) = (lo, lo, hi);
        while i < gt {
            let Some(&v) = values.get(i) else {
                return;
            };
            if less(v, pivot) {
                swap(values, lt, i);
                lt += 1;
                i += 1;
            } else if less(pivot, v) {
                gt -= 1;
                swap(values, i, gt);
            } else {
                i += 1;
            }
        }
        if k < lt {
            hi = lt;
        } else if k >= gt {
            lo = gt;
        } else {
            return;
        }
    }
    if let Some(rest) = values.get_mut(lo..hi) {
        heapsort_by(rest, less);
    }
}

/// Exchanges two elements; out-of-range indices (never passed) leave the slice unchanged.
fn swap<T: Copy>(values: &mut [T], i: usize, j: usize) {
    if let (Some(&a), Some(&b)) = (values.get(i), values.get(j)) {
        if let Some(slot) = values.get_mut(i) {
            *slot = b;
        }
        if let Some(slot) = values.get_mut(j) {
            *slot = a;
        }
    }
}

/// Restores the max-heap property below `root` within `values[..end]`.
fn sift_down<T: Copy>(values: &mut [T], mut root: usize, end: usize, less: &impl Fn(T, T) -> bool) {
    loop {
        // root < end <= len <= isize::MAX: 2 root + 2 cannot overflow.
        let mut child = 2 * root + 1;
        if child >= end {
            return;
        }
        if child + 1 < end {
            if let (Some(&left), Some(&right)) = (values.get(child), values.get(child + 1)) {
                if less(left, right) {
                    child += 1;
                }
            }
        }
        let (Some(&parent), Some(&larger)) = (values.get(root), values.get(child)) else {
            return;
        };
        if !less(parent, larger) {
            return;
        }
        swap(values, root, child);
        root = child;
    }
}

#[cfg(test)]
mod tests {
    extern crate std;
    use super::{heapsort_by, select_nth_by};
    use crate::test_rng::Lcg;
    use std::vec;
    use std::vec::Vec;

    /// Selection against core's sort: every position of pseudo-random data (ties, signed
    /// zeros, infinities, NaN) of every length up to 70, and of long sorted, reversed,
    /// constant and two-valued inputs (the shapes that defeat a naive quickselect).
    #[test]
    fn selection_agrees_with_core_sort() {
        let mut rng = Lcg(7);
        let mut next = move || (rng.step() >> 33) % 23;
        for len in 0..70 {
            let data: Vec<f64> = (0..len)
                .map(|_| match next() {
                    0 => f64::INFINITY,
                    1 => f64::NEG_INFINITY,
                    2 => -0.0,
                    3 => f64::NAN,
                    r => f64::from(u32::try_from(r).unwrap()) - 11.0,
                })
                .collect();
            let mut sorted = data.clone();
            sorted.sort_by(f64::total_cmp);
            for k in 0..=len {
                let mut a = data.clone();
                select_nth_by(&mut a, k, |x, y| x.total_cmp(&y).is_lt());
                if k == len {
                    assert_eq!(
                        a.iter().map(|x| x.to_bits()).collect::<Vec<_>>(),
                        data.iter().map(|x| x.to_bits()).collect::<Vec<_>>()
                    );
                    continue;
                }
                assert_eq!(a[k].to_bits(), sorted[k].to_bits(), "length {len}, k {k}");
                assert!(a[..k].iter().all(|x| x.total_cmp(&a[k]).is_le()));
                assert!(a[k + 1..].iter().all(|x| x.total_cmp(&a[k]).is_ge()));
            }
        }
        let n = 100_001;
        let shapes: Vec<Vec<f64>> = vec![
            (0..n).map(f64::from).collect(),
            (0..n).rev().map(f64::from).collect(),
            vec![1.5; 100_001],
            (0..n).map(|i| f64::from(i % 2)).collect(),
            (0..n).map(|i| f64::from((i * 7919) % 1000)).collect(),
        ];
        for (s, data) in shapes.iter().enumerate() {
            let mut sorted = data.clone();
            sorted.sort_by(f64::total_cmp);
            for k in [0, 1, 50_000, 99_999, 100_000] {
                let mut a = data.clone();
                select_nth_by(&mut a, k, |x, y| x.total_cmp(&y).is_lt());
                assert_eq!(a[k].to_bits(), sorted[k].to_bits(), "shape {s}, k {k}");
            }
        }
    }

    /// Against core's sort on pseudo-random data of every length up to 70 (a linear
    /// congruential generator, Knuth's MMIX constants), with ties, signed zeros and
    /// infinities.
    #[test]
    fn agrees_with_core_sort() {
        let mut rng = Lcg(1);
        for len in 0..70 {
            let mut a = [0.0f64; 70];
            for x in a.iter_mut().take(len) {
                let r = (rng.step() >> 33) % 23;
                *x = match r {
                    0 => f64::INFINITY,
                    1 => f64::NEG_INFINITY,
                    2 => -0.0,
                    _ => f64::from(u32::try_from(r).unwrap()) - 11.0,
                };
            }
            let mut b = a;
            heapsort_by(&mut a[..len], |x, y| x.total_cmp(&y).is_lt());
            b[..len].sort_by(f64::total_cmp);
            for (x, y) in a[..len].iter().zip(&b[..len]) {
                assert_eq!(x.to_bits(), y.to_bits(), "length {len}");
            }
        }
    }
}
