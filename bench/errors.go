package bench

// KeyError reports a target, spec, adjuster or condition list that cannot
// be used: the key or text as written and why, in one line.
type KeyError struct {
	Key, Msg string
}

func (e *KeyError) Error() string { return e.Key + ": " + e.Msg }

func keyErr(key, format string, a ...any) error {
	return &KeyError{Key: key, Msg: sprintf(format, a...)}
}
