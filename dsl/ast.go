package dsl

// Node is any syntax tree node; Pos is where it starts.
type Node interface{ Position() Pos }

// Expr is an expression: a quantity, a name, arithmetic, a conversion or a call.
type Expr interface {
	Node
	exprNode()
}

// Ident is a name as written.
type Ident struct {
	P    Pos
	Name string
}

// UnitRef is a unit as written after a number or `in`.
type UnitRef struct {
	P    Pos
	Name string
}

// Number is a literal with an optional unit: `250 us`.
type Number struct {
	P     Pos
	Text  string
	Value float64
	Unit  *UnitRef
}

// Unary is `-X` or `+X`.
type Unary struct {
	P  Pos
	Op tokKind
	X  Expr
}

// Binary is `X op Y` with op one of + - * /; P is the operator's position.
type Binary struct {
	P    Pos
	Op   tokKind
	X, Y Expr
}

// Convert is `X in UNIT`.
type Convert struct {
	P    Pos
	X    Expr
	Unit UnitRef
}

// Call is `NAME(ARG, ...)`: a shape call, a copy of a pulse with arguments changed,
// or a train.
type Call struct {
	Fun    Ident
	Args   []*Arg
	Rparen Pos
}

// Arg is `NAME = EXPR` (named) or, in a train, an element `EXPR [at PHASE]`.
type Arg struct {
	Name  *Ident
	Value Expr
	At    Expr
}

func (x *Ident) Position() Pos   { return x.P }
func (x *Number) Position() Pos  { return x.P }
func (x *Unary) Position() Pos   { return x.P }
func (x *Binary) Position() Pos  { return x.X.Position() }
func (x *Convert) Position() Pos { return x.X.Position() }
func (x *Call) Position() Pos    { return x.Fun.P }
func (x *Ident) exprNode()       {}
func (x *Number) exprNode()      {}
func (x *Unary) exprNode()       {}
func (x *Binary) exprNode()      {}
func (x *Convert) exprNode()     {}
func (x *Call) exprNode()        {}

// Stmt is one statement.
type Stmt interface {
	Node
	stmtNode()
}

// Setting is `NAME = EXPR` after `with`.
type Setting struct {
	Name  Ident
	Value Expr
}

// Axis is `KIND FROM to TO (points N | step S)`.
type Axis struct {
	Kind     Ident
	From, To Expr
	Points   Expr // nil when Step is given
	Step     Expr
}

type (
	// NucleusStmt is `nucleus 31P`.
	NucleusStmt struct {
		P     Pos
		Name  string
		NameP Pos
	}
	// FieldStmt is `field 7 T`.
	FieldStmt struct {
		P Pos
		X Expr
	}
	// LetStmt is `let NAME = EXPR`.
	LetStmt struct {
		P    Pos
		Name Ident
		X    Expr
	}
	// PulseStmt is `pulse NAME = SHAPE(...)` or `pulse NAME = OTHER(...)`.
	PulseStmt struct {
		P    Pos
		Name Ident
		Call *Call
	}
	// DescribeStmt is `describe NAME, ... [with ...]`.
	DescribeStmt struct {
		P     Pos
		Names []Ident
		With  []Setting
	}
	// SweepStmt is `sweep NAME, ... over AXIS[, AXIS] [show Q, ...] [with ...]`.
	SweepStmt struct {
		P     Pos
		Names []Ident
		Axes  []Axis
		Show  []Ident
		With  []Setting
	}
	// PrintStmt is `print EXPR, ...`.
	PrintStmt struct {
		P  Pos
		Xs []Expr
	}
	// ExportStmt is `export NAME to "file.csv"`.
	ExportStmt struct {
		P     Pos
		Name  Ident
		Path  string
		PathP Pos
	}
	// ImportStmt is `import NAME from "file.csv" [with dwell = EXPR]`.
	ImportStmt struct {
		P     Pos
		Name  Ident
		Path  string
		PathP Pos
		With  []Setting
	}
	// ReportStmt is `report NAME, ... [as markdown | as latex]`.
	ReportStmt struct {
		P      Pos
		Names  []Ident
		Format *Ident
	}
	// HelpStmt is `help [TOPIC]`.
	HelpStmt struct {
		P      Pos
		Topic  string
		TopicP Pos
	}
	// ResetStmt is `reset`.
	ResetStmt struct{ P Pos }
)

func (s *NucleusStmt) Position() Pos  { return s.P }
func (s *FieldStmt) Position() Pos    { return s.P }
func (s *LetStmt) Position() Pos      { return s.P }
func (s *PulseStmt) Position() Pos    { return s.P }
func (s *DescribeStmt) Position() Pos { return s.P }
func (s *SweepStmt) Position() Pos    { return s.P }
func (s *PrintStmt) Position() Pos    { return s.P }
func (s *ExportStmt) Position() Pos   { return s.P }
func (s *ImportStmt) Position() Pos   { return s.P }
func (s *ReportStmt) Position() Pos   { return s.P }
func (s *HelpStmt) Position() Pos     { return s.P }
func (s *ResetStmt) Position() Pos    { return s.P }
func (*NucleusStmt) stmtNode()        {}
func (*FieldStmt) stmtNode()          {}
func (*LetStmt) stmtNode()            {}
func (*PulseStmt) stmtNode()          {}
func (*DescribeStmt) stmtNode()       {}
func (*SweepStmt) stmtNode()          {}
func (*PrintStmt) stmtNode()          {}
func (*ExportStmt) stmtNode()         {}
func (*ImportStmt) stmtNode()         {}
func (*ReportStmt) stmtNode()         {}
func (*HelpStmt) stmtNode()           {}
func (*ResetStmt) stmtNode()          {}
