//! Panic containment: a reader's library that panics on a hostile file costs that file, not
//! the run, and the panic is reported as a warning rather than printed by the panic hook.

thread_local! {
    /// How many `contain` calls are running on this thread.
    static CONTAINED: std::cell::Cell<usize> = const { std::cell::Cell::new(0) };
}

/// Run `f`, turning a panic into `Err`. A panic contained this way is reported by the caller
/// as a warning, so the panic hook from `quiet_contained_panics` does not print it as well.
pub(super) fn contain<T>(f: impl FnOnce() -> T) -> std::thread::Result<T> {
    CONTAINED.with(|c| c.set(c.get() + 1));
    let r = std::panic::catch_unwind(std::panic::AssertUnwindSafe(f));
    CONTAINED.with(|c| c.set(c.get() - 1));
    r
}

/// Install a panic hook that stays silent for panics that `contain` catches (a reader's library
/// failing on a hostile file: the run warns about the file instead) and prints every other panic
/// as the default hook does. For binaries; call once at start-up.
pub fn quiet_contained_panics() {
    let default = std::panic::take_hook();
    std::panic::set_hook(Box::new(move |info| {
        if CONTAINED.with(|c| c.get()) == 0 {
            default(info);
        }
    }));
}
