//! A list that keeps its first [`LIST_CAP`] items and counts the rest: how the summary and the
//! observed tally stay bounded however long the file.

/// Ids kept per list (per zone, borderline, not conservative) and rejected rows kept; the
/// totals are counted.
pub const LIST_CAP: usize = 1_000;

/// A list that keeps its first [`LIST_CAP`] items and counts the rest.
#[derive(Debug, Clone, PartialEq)]
pub struct Capped<T> {
    /// The first items, in file order.
    pub items: Vec<T>,
    /// How many there were in all.
    pub total: usize,
}

impl<T> Default for Capped<T> {
    fn default() -> Self {
        Capped {
            items: Vec::new(),
            total: 0,
        }
    }
}

impl<T> Capped<T> {
    /// Add one.
    pub fn push(&mut self, t: T) {
        self.push_with(|| t);
    }
    /// Add one, made only when there is room for it.
    pub fn push_with(&mut self, t: impl FnOnce() -> T) {
        self.total += 1;
        if self.items.len() < LIST_CAP {
            self.items.push(t());
        }
    }
    /// Append `other` (which follows in file order).
    pub fn merge(&mut self, other: Capped<T>) {
        self.total += other.total;
        let room = LIST_CAP.saturating_sub(self.items.len());
        self.items.extend(other.items.into_iter().take(room));
    }
}
