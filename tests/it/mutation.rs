//! Mutate every example thousands of times (byte flips, truncations,
//! deletions, duplications) and assert the checker never panics and always
//! gives either a model or at least one diagnostic.

use tandem::source::Source;

/// A small deterministic generator (xorshift64*), so failures reproduce.
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        self.0.wrapping_mul(0x2545_F491_4F6C_DD1D)
    }
    fn below(&mut self, n: usize) -> usize {
        usize::try_from(self.next() % (n.max(1) as u64)).unwrap_or(0)
    }
}

const BYTES: &[u8] = b"{}()=,.:;#\"\\^*/+-_0123456789e \n\tabcxyzkipsinft";

fn mutate(rng: &mut Rng, text: &[u8]) -> Vec<u8> {
    let mut t = text.to_vec();
    for _ in 0..=rng.below(3) {
        if t.is_empty() {
            break;
        }
        let i = rng.below(t.len());
        match rng.below(5) {
            0 => t[i] = BYTES[rng.below(BYTES.len())],
            1 => t.truncate(i),
            2 => {
                let end = (i + rng.below(40)).min(t.len());
                t.drain(i..end);
            }
            3 => {
                let end = (i + rng.below(40)).min(t.len());
                let chunk = t[i..end].to_vec();
                let at = rng.below(t.len());
                t.splice(at..at, chunk);
            }
            _ => t[i] ^= 1 << rng.below(8),
        }
    }
    t
}

#[test]
fn mutated_examples_never_panic() {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples");
    let mut files: Vec<_> = std::fs::read_dir(dir)
        .expect("examples")
        .filter_map(Result::ok)
        .map(|e| e.path())
        .filter(|p| p.extension().is_some_and(|e| e == "tandem"))
        .collect();
    files.sort();
    assert!(!files.is_empty());
    let mut rng = Rng(0x9E37_79B9_7F4A_7C15);
    let mut models = 0;
    let mut rejected = 0;
    for path in &files {
        let original = std::fs::read(path).expect("read example");
        for _ in 0..2500 {
            let bytes = mutate(&mut rng, &original);
            // Non-UTF-8 input is refused before parsing, as read_source does.
            let Ok(text) = String::from_utf8(bytes) else {
                continue;
            };
            let src = Source::new("mutant.tandem", text);
            match tandem::check(&src) {
                Ok(_) => models += 1,
                Err(errors) => {
                    assert!(!errors.is_empty());
                    // rendering must not panic either
                    let _ = tandem::diagnostic::render(&errors, &src, 80, false);
                    rejected += 1;
                }
            }
        }
    }
    assert!(
        models > 0 && rejected > 0,
        "{models} models, {rejected} rejected"
    );
}
