// Brine.g4 - the grammar of brine specs. Generated into the build tree at build time;
// only compiler/parse/ sees the generated types.
grammar Brine;

@parser::members {
  // A unit is written right after its number on the same line, with no spaces inside it,
  // so "1 /ms * x" is one per millisecond times x, and "1 /ms*x" is a unit "ms*x".
  bool touching(size_t a, size_t b) {
    auto *l = _input->LT(static_cast<ssize_t>(a));
    auto *r = _input->LT(static_cast<ssize_t>(b));
    return l && r && l->getStopIndex() + 1 == r->getStartIndex();
  }
  bool unitStarts() {
    auto *prev = _input->LT(-1);
    auto *next = _input->LT(1);
    if (!prev || !next || prev->getLine() != next->getLine()) return false;
    if (next->getType() == SLASH) return touching(1, 2);
    return true;
  }
  bool unitContinues() { return touching(-1, 1) && touching(1, 2); }
  bool exponentFollows() { return touching(-1, 1); }
}

spec : item* EOF ;

item
  : modelHeader
  | useDecl
  | temperatureDecl
  | ionDecl
  | constDecl
  | fnDecl
  | outsideDecl
  | compartmentDecl
  | channelDecl
  | pumpDecl
  | ';'
  ;

// model NAME "title"
modelHeader : MODEL IDENT STRING? ;
// use std.ions | use "file.brine"
useDecl : USE (modulePath | STRING) ;
modulePath : IDENT ('.' IDENT)* ;
// temperature 37 degC
temperatureDecl : TEMPERATURE expr ;
// ion Na valence +1
ionDecl : ION IDENT VALENCE signedNumber ;
signedNumber : sign=('+' | '-')? NUMBER ;
// const NAME (: unit)? = expr
constDecl : CONST IDENT (':' unitType)? '=' expr ;
// fn NAME(param: unit, ...) -> unit = expr
fnDecl : FN IDENT '(' (param (',' param)*)? ')' '->' unitType '=' expr ;
param : IDENT ':' unitType ;
unitType : unitTypeTerm (('*' | '/' | DOT) unitTypeTerm)* ;
unitTypeTerm : NUMBER | IDENT ('^' '-'? NUMBER)? | '(' unitType ')' ;

// outside NAME { [X] = c ... }
outsideDecl : OUTSIDE IDENT solutionBlock ;
solutionBlock : '{' solutionEntry* '}' ;
solutionEntry
  : '[' IDENT ']' '=' expr          # concentrationEntry
  | IMPERMEANT expr VALENCE signedNumber   # impermeantEntry
  | ';'                             # emptySolutionEntry
  ;

compartmentDecl : COMPARTMENT IDENT '{' compartmentItem* '}' ;
compartmentItem
  : SPHERE DIAMETER expr                          # sphereItem
  | CYLINDER LENGTH expr DIAMETER expr            # cylinderItem
  | AREA expr                                     # areaItem
  | CAPACITANCE expr                              # capacitanceItem
  | INITIAL IDENT '=' expr                        # initialItem
  | OUTSIDE IDENT                                 # bathItem
  | INSIDE solutionBlock                          # insideItem
  | MEMBRANE '{' membraneEntry* '}'               # membraneItem
  | ';'                                           # emptyCompartmentItem
  ;
membraneEntry : IDENT expr (REVERSAL expr)? ';'? ;

channelDecl : CHANNEL IDENT '{' channelItem* '}' ;
channelItem
  : CARRIES carried (',' carried)*                # carriesItem
  | REVERSAL expr                                 # reversalItem
  | GATE IDENT (POWER NUMBER)? '{' gateItem* '}'  # gateDecl
  | Q10 expr AT expr                              # q10Item
  | ';'                                           # emptyChannelItem
  ;
carried : IDENT NUMBER? ;
gateItem : rate=(OPENING | CLOSING | STEADY | TAU) '=' expr ';'? ;

pumpDecl : kind=(PUMP | EXCHANGER) IDENT '{' pumpItem* '}' ;
pumpItem
  : CYCLE stoichTerm (',' stoichTerm)*            # cycleItem
  | ACTIVITY '=' expr                             # activityItem
  | ';'                                           # emptyPumpItem
  ;
stoichTerm : NUMBER IDENT dir=(IN | OUT) ;

expr
  : IF expr THEN expr ELSE expr                   # ifExpr
  | orExpr                                        # plainExpr
  ;
orExpr : andExpr (OR andExpr)* ;
andExpr : notExpr (AND notExpr)* ;
notExpr : NOT notExpr | cmpExpr ;
cmpExpr : addExpr (op=('==' | '!=' | '<' | '<=' | '>' | '>=') addExpr)? ;
addExpr : mulExpr (ops+=('+' | '-') mulExpr)* ;
mulExpr : unaryExpr (ops+=('*' | '/') unaryExpr)* ;
unaryExpr : op=('-' | '+') unaryExpr | powExpr ;
powExpr : primary ('^' unaryExpr)? ;
primary
  : quantity                                      # quantityPrimary
  | IDENT '(' (expr (',' expr)*)? ')'             # callPrimary
  | IDENT                                         # namePrimary
  | '[' IDENT ']' side=(IN | OUT)                 # concentrationPrimary
  | '(' expr ')'                                  # parenPrimary
  ;

// quantity : NUMBER unit? ; the unit is on the number's line and has no spaces inside
quantity : NUMBER ({unitStarts()}? unit)? ;
unit : leadingSlash=SLASH? unitFactor ({unitContinues()}? unitOp unitFactor)* ;
unitOp : '*' | SLASH | DOT ;
unitFactor : IDENT ({exponentFollows()}? '^' '-'? NUMBER)? ;

MODEL : 'model' ;
USE : 'use' ;
TEMPERATURE : 'temperature' ;
ION : 'ion' ;
VALENCE : 'valence' ;
CONST : 'const' ;
FN : 'fn' ;
OUTSIDE : 'outside' ;
INSIDE : 'inside' ;
IMPERMEANT : 'impermeant' ;
COMPARTMENT : 'compartment' ;
SPHERE : 'sphere' ;
CYLINDER : 'cylinder' ;
DIAMETER : 'diameter' ;
LENGTH : 'length' ;
AREA : 'area' ;
CAPACITANCE : 'capacitance' ;
INITIAL : 'initial' ;
MEMBRANE : 'membrane' ;
CHANNEL : 'channel' ;
CARRIES : 'carries' ;
REVERSAL : 'reversal' ;
GATE : 'gate' ;
POWER : 'power' ;
OPENING : 'opening' ;
CLOSING : 'closing' ;
STEADY : 'steady' ;
TAU : 'tau' ;
Q10 : 'q10' ;
AT : 'at' ;
PUMP : 'pump' ;
EXCHANGER : 'exchanger' ;
CYCLE : 'cycle' ;
ACTIVITY : 'activity' ;
IN : 'in' ;
OUT : 'out' ;
IF : 'if' ;
THEN : 'then' ;
ELSE : 'else' ;
AND : 'and' ;
OR : 'or' ;
NOT : 'not' ;

SLASH : '/' ;
DOT : [\u00B7] ;
NUMBER : DIGITS ('.' DIGITS?)? EXPONENT? | '.' DIGITS EXPONENT? ;
fragment DIGITS : [0-9]+ ;
fragment EXPONENT : [eE] [+-]? DIGITS ;
IDENT : LETTER (LETTER | [0-9])* ;
fragment LETTER : [a-zA-Z_] | '\u00B5' | '\u03BC' | '\u03A9' | '\u2126' | '\u00B0' ;
STRING : '"' (~["\\\r\n] | '\\' ~[\r\n])* '"' ;
UNTERMINATED_STRING : '"' (~["\\\r\n] | '\\' ~[\r\n])* ;
DOC_COMMENT : '##' ~[\r\n]* -> channel(HIDDEN) ;
COMMENT : '#' ~[\r\n]* -> skip ;
WS : [ \t\r\n\f\uFEFF]+ -> skip ;
STRAY : . ;
