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
    use super::heapsort_by;

    /// Against core's sort on pseudo-random data of every length up to 70 (a linear
    /// congruential generator, Knuth's MMIX constants), with ties, signed zeros and
    /// infinities.
    #[test]
    fn agrees_with_core_sort() {
        let mut state: u64 = 1;
        for len in 0..70 {
            let mut a = [0.0f64; 70];
            for x in a.iter_mut().take(len) {
                state = state
                    .wrapping_mul(6_364_136_223_846_793_005)
                    .wrapping_add(1_442_695_040_888_963_407);
                let r = (state >> 33) % 23;
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
