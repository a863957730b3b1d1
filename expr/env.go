package expr

import (
	"fmt"
	"sort"
	"strings"

	"golang.org/x/text/unicode/norm"
)

// Binding is a defined name.
type Binding struct {
	Name  string
	Value Value // nil when Unavailable
	Pos   Pos   // where it is defined
	// Unavailable marks a name whose definition failed; lines that use it
	// report that once, pointing at Pos, instead of repeating the error.
	Unavailable bool
	// Cause is where the failure that made the name unavailable lies: its
	// own definition, or the root failure it depended on.
	Cause Pos
	// Display is how the definition asked the value to be shown, or nil.
	Display *Display
	// Cases holds one value per case of the document (Env.Cases), in its
	// order, for a value that depends on a case; nil otherwise. Value is
	// then the first case's value. A case whose value could not be had
	// (a solve that failed in it) holds nil.
	Cases []Value
}

// Func is a user function f(a, b) = body.
type Func struct {
	Name   string
	Params []string
	Body   Node
	Pos    Pos
	keys   []string // NameKey of each parameter, set by DefineFunc
}

// Env is the set of names a block sees: everything defined above it.
// Names are defined once; Define refuses a second definition. Names are
// kept and looked up by their key (NameKey), so that "phi" and "φ" are
// one name; Binding.Name keeps the name as its definition wrote it.
type Env struct {
	vars  map[string]*Binding
	funcs map[string]*Func
	order []string
	// tables are the tables of data defined by DefineTable (tables.go).
	tables map[string]*tableBinding
	// Preferred is the document's preferred display units, or nil.
	Preferred *Preferred
	// Budget is the evaluation work the document may still spend, shared
	// by every evaluation in the environment; nil is no limit.
	Budget *Budget
	// Cases names the document's cases (front matter "cases"), or nil.
	Cases []string
	// caseIdx is the case being evaluated (an index into Cases);
	// caseDep records that an evaluation read a value with cases.
	caseIdx int
	caseDep bool
	// mem holds the slabs of what Exec keeps (arena.go), made on first
	// use; a pointer, so that a copy of an Env shares it rather than
	// handing out the same free elements twice.
	mem *envMem
}

// NewEnv returns an empty environment with a budget of DefaultBudget.
func NewEnv() *Env {
	return &Env{vars: map[string]*Binding{}, funcs: map[string]*Func{}, Budget: NewBudget(DefaultBudget)}
}

// Reserve makes room for about n names in an environment that holds
// none yet, so that its table is made once at its size instead of growing
// (and moving every name) as the names come; it does nothing to an
// environment that holds names. Room never changes what is defined.
func (e *Env) Reserve(n int) {
	if n <= 0 || len(e.vars) > 0 || len(e.order) > 0 {
		return
	}
	e.vars = make(map[string]*Binding, n)
	e.order = make([]string, 0, n)
}

// Lookup returns the binding of a name, or nil.
func (e *Env) Lookup(name string) *Binding { return e.vars[NameKey(name)] }

// LookupKey is Lookup of a name by its key (NameKey), made before.
func (e *Env) LookupKey(key string) *Binding { return e.vars[key] }

// LookupFunc returns a user function, or nil.
func (e *Env) LookupFunc(name string) *Func { return e.funcs[NameKey(name)] }

// Names lists the defined value names in the order they were defined.
func (e *Env) Names() []string { return append([]string(nil), e.order...) }

// IsBuiltin reports whether name is a built-in function or constant.
func IsBuiltin(name string) bool { return isBuiltinKey(NameKey(name)) }

// isBuiltinKey is IsBuiltin of a name's key.
func isBuiltinKey(key string) bool {
	if !builtinShaped(key) {
		return false
	}
	if _, ok := builtins[key]; ok {
		return true
	}
	_, ok := constants[key]
	return ok || reserved[key]
}

var reserved = map[string]bool{"check": true, "casemax": true, "casemin": true}

// builtinShaped reports whether key could be a built-in's: no built-in
// function, constant or keyword holds '_' or a capital ASCII letter
// (TestBuiltinShape holds them to it), while most names a document
// defines do, so most keys skip the three look-ups.
func builtinShaped(key string) bool {
	for i := 0; i < len(key); i++ {
		if c := key[i]; c == '_' || c >= 'A' && c <= 'Z' {
			return false
		}
	}
	return true
}

// BuiltinNames lists the built-in functions, sorted.
func BuiltinNames() []string {
	var out []string
	for n := range builtins {
		out = append(out, n)
	}
	sort.Strings(out)
	return out
}

// CanDefine reports why name cannot be defined at pos, or nil.
func (e *Env) CanDefine(name string, pos Pos) *Error {
	return e.canDefine(name, NameKey(name), pos)
}

// canDefine is CanDefine of a name whose key is known.
func (e *Env) canDefine(name, key string, pos Pos) *Error {
	if tab, col, ok := strings.Cut(name, "."); ok {
		return Errorf(pos, "%q is a column of a table (%s.%s): a name being defined holds no '.' (write %s_%s)", name, tab, col, tab, col)
	}
	if isBuiltinKey(key) {
		what := "built-in function"
		if _, ok := constants[key]; ok {
			what = "built-in constant"
		}
		if name == "check" {
			what = "keyword"
		}
		return Errorf(pos, "%q is a %s and cannot be redefined: choose another name", name, what)
	}
	if b := e.vars[key]; b != nil {
		return Errorf(pos, "%q is already defined at line %d%s: each name is defined once (choose another name, e.g. %s_2)", name, b.Pos.Line(), sameNameNote(name, b.Name), name)
	}
	if f := e.funcs[key]; f != nil {
		return Errorf(pos, "%q is already defined as a function at line %d%s: each name is defined once", name, f.Pos.Line(), sameNameNote(name, f.Name))
	}
	if t := e.tables[key]; t != nil {
		return Errorf(pos, "%q is already defined as a table at line %d%s: each name is defined once", name, t.pos.Line(), sameNameNote(name, t.name))
	}
	return nil
}

// sameNameNote says why two spellings are one name, or nothing when they
// are written alike.
func sameNameNote(name, first string) string {
	switch {
	case name == first:
		return ""
	case norm.NFKC.String(name) == norm.NFKC.String(first):
		return fmt.Sprintf(", written %q (the same name after Unicode NFKC normalisation)", first)
	}
	return fmt.Sprintf(", written %q (a spelled Greek name and its letter are one name)", first)
}

// Define adds a value. It returns an error when the name is taken.
func (e *Env) Define(b *Binding) *Error {
	key := NameKey(b.Name)
	if err := e.canDefine(b.Name, key, b.Pos); err != nil {
		return err
	}
	e.put(key, b)
	return nil
}

// put is Define of a binding whose name, of the given key, has passed
// canDefine with nothing defined since: one look-up of the key, not two.
func (e *Env) put(key string, b *Binding) {
	e.vars[key] = b
	e.order = append(e.order, b.Name)
}

// DefineFunc adds a user function.
func (e *Env) DefineFunc(f *Func) *Error {
	if err := e.CanDefine(f.Name, f.Pos); err != nil {
		return err
	}
	f.keys = make([]string, len(f.Params))
	for i, p := range f.Params {
		f.keys[i] = NameKey(p)
	}
	e.funcs[NameKey(f.Name)] = f
	return nil
}

// UnavailableError is the error of an expression that uses a name whose
// definition failed.
type UnavailableError struct {
	Pos  Pos    // where the name is used
	Name string // the name
	Def  Pos    // where its definition failed
}

func (u *UnavailableError) Error() string {
	return fmt.Sprintf("%s: %q has no value because its definition at line %d failed", u.Pos, u.Name, u.Def.Line())
}
