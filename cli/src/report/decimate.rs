//! Reduction of long polylines for drawing: per pixel column only the lowest and the
//! highest point are kept, in their original order, so peaks survive and a line has at
//! most two points per column:
//!
//! ```text
//! column(x) = floor(px(x));   keep argmin_y and argmax_y of each run of equal columns
//! ```

/// Pixel polyline(s) reduced to the lowest and highest point of each pixel column, in
/// their original order; a missing point (`None`) breaks the line.
pub fn decimate(points: impl Iterator<Item = Option<(f64, f64)>>) -> Vec<Vec<(f64, f64)>> {
    struct Bucket {
        col: i64,
        low: (usize, f64, f64),
        high: (usize, f64, f64),
    }
    fn flush(bucket: &mut Option<Bucket>, seg: &mut Vec<(f64, f64)>) {
        if let Some(b) = bucket.take() {
            let (first, second) = if b.low.0 <= b.high.0 {
                (b.low, b.high)
            } else {
                (b.high, b.low)
            };
            seg.push((first.1, first.2));
            if second.0 != first.0 {
                seg.push((second.1, second.2));
            }
        }
    }
    let mut segments = Vec::new();
    let mut seg = Vec::new();
    let mut bucket: Option<Bucket> = None;
    for (i, p) in points.enumerate() {
        match p {
            None => {
                flush(&mut bucket, &mut seg);
                if !seg.is_empty() {
                    segments.push(std::mem::take(&mut seg));
                }
            }
            Some((x, y)) => {
                let col = x.floor() as i64;
                match bucket.as_mut() {
                    Some(b) if b.col == col => {
                        // Pixel y grows downwards: "low" is the smallest pixel y.
                        if y < b.low.2 {
                            b.low = (i, x, y);
                        }
                        if y > b.high.2 {
                            b.high = (i, x, y);
                        }
                    }
                    _ => {
                        flush(&mut bucket, &mut seg);
                        bucket = Some(Bucket {
                            col,
                            low: (i, x, y),
                            high: (i, x, y),
                        });
                    }
                }
            }
        }
    }
    flush(&mut bucket, &mut seg);
    if !seg.is_empty() {
        segments.push(seg);
    }
    segments
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn decimate_keeps_extremes_and_bounds_points() {
        // 200 000 points of a fast sine over 600 px: at most two points per column.
        let n = 200_000;
        let pts: Vec<(f64, f64)> = (0..n)
            .map(|i| {
                let t = f64::from(i) / f64::from(n);
                (100.0 + 600.0 * t, 150.0 + 100.0 * (400.0 * t).sin())
            })
            .collect();
        let segs = decimate(pts.iter().map(|&p| Some(p)));
        assert_eq!(segs.len(), 1);
        let kept = &segs[0];
        assert!(kept.len() <= 2 * 601, "{} points", kept.len());
        let min_y = kept.iter().map(|p| p.1).fold(f64::INFINITY, f64::min);
        let max_y = kept.iter().map(|p| p.1).fold(f64::NEG_INFINITY, f64::max);
        let true_min = pts.iter().map(|p| p.1).fold(f64::INFINITY, f64::min);
        let true_max = pts.iter().map(|p| p.1).fold(f64::NEG_INFINITY, f64::max);
        assert_eq!((min_y, max_y), (true_min, true_max));
        assert!(kept.windows(2).all(|w| w[0].0 <= w[1].0), "order kept");
    }

    #[test]
    fn decimate_breaks_at_missing_points() {
        let pts = [Some((0.0, 1.0)), Some((1.5, 2.0)), None, Some((3.0, 1.0))];
        let segs = decimate(pts.into_iter());
        assert_eq!(segs, vec![vec![(0.0, 1.0), (1.5, 2.0)], vec![(3.0, 1.0)]]);
    }
}
