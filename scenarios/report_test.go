package scenarios

import "testing"

// TestMaskedByWords: a self-masked target (masked_by its own id, as the
// harbour demo's pilot boat) reads "by its own sidelobes", never "by
// pilot-boat" beside pilot-boat's own row.
func TestMaskedByWords(t *testing.T) {
	for _, c := range []struct{ id, by, want string }{
		{"skiff", "tanker", " by tanker"},
		{"pilot-boat", "pilot-boat", " by its own sidelobes"},
		{"tanker", "", ""},
	} {
		if got := MaskedByWords(c.id, c.by); got != c.want {
			t.Errorf("MaskedByWords(%q, %q) = %q, want %q", c.id, c.by, got, c.want)
		}
	}
}
