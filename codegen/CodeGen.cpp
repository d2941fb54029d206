// CodeGen.cpp - Stage 9a: IR kernel -> LLVM module.
//
// Every IR node becomes exactly one LLVM value, in node order, so the IR's sharing of common
// subexpressions carries over unchanged; O3 (in JIT.cpp) does the rest.
#include "CodeGen.h"

#include <llvm/IR/IRBuilder.h>
#include <llvm/IR/Intrinsics.h>
#include <llvm/IR/LLVMContext.h>
#include <llvm/IR/Module.h>

#include <vector>

namespace saltpan {
namespace {

class KernelEmitter {
public:
  KernelEmitter(const ir::Kernel &kernel, llvm::Module &module, int lanes)
      : kernel_(kernel), module_(module), builder_(module.getContext()),
        double_(llvm::Type::getDoubleTy(module.getContext())), lanes_(lanes),
        value_(lanes > 1 ? static_cast<llvm::Type *>(llvm::FixedVectorType::get(double_, lanes)) : double_) {}

  bool emit(const std::string &name);

private:
  llvm::Value *emitNode(const ir::Node &n);
  llvm::Value *load(llvm::Value *base, int index, const char *name);
  llvm::Value *truth(llvm::Value *v); // v != 0 (unordered, so NaN is true)
  llvm::Value *toDouble(llvm::Value *flag) { return builder_.CreateUIToFP(flag, value_); }
  llvm::Value *libmCall(const char *name, llvm::Value *arg);
  // A math function of one or two operands: the scalar libm call, or in lane mode glibc's
  // libmvec variant of the same width (each lane computed on its own, as libmvec promises).
  llvm::Value *mathCall(const char *name, llvm::Value *a, llvm::Value *b = nullptr);

  const ir::Kernel &kernel_;
  llvm::Module &module_;
  llvm::IRBuilder<> builder_;
  llvm::Type *double_;
  int lanes_;
  llvm::Type *value_; // double, or <lanes x double>
  llvm::Value *y_ = nullptr, *p_ = nullptr, *t_ = nullptr;
  std::vector<llvm::Value *> values_;
};

bool KernelEmitter::emit(const std::string &name) {
  const auto &nodes = kernel_.nodes();
  // The IR promises dependency order; check it so a bad kernel cannot make us read garbage.
  for (size_t i = 0; i < nodes.size(); ++i) {
    const ir::Node &n = nodes[i];
    int count = ir::arity(n.op);
    const ir::NodeId operands[3] = {n.a, n.b, n.c};
    for (int k = 0; k < count; ++k)
      if (operands[k] < 0 || static_cast<size_t>(operands[k]) >= i)
        return false;
    if ((n.op == ir::Op::State || n.op == ir::Op::Param) && n.index < 0)
      return false;
  }
  for (ir::NodeId o : kernel_.outputs)
    if (o < 0 || static_cast<size_t>(o) >= nodes.size())
      return false;

  llvm::LLVMContext &ctx = module_.getContext();
  llvm::Type *ptr = llvm::PointerType::getUnqual(ctx);
  auto *type = llvm::FunctionType::get(llvm::Type::getVoidTy(ctx), {ptr, ptr, double_, ptr}, false);
  // In lane mode y, p and out hold `lanes_` values per slot side by side (slot s of lane l
  // at s * lanes + l), so each slot is one vector load or store.
  auto *fn = llvm::Function::Create(type, llvm::Function::ExternalLinkage, name, module_);
  fn->setCallingConv(llvm::CallingConv::C);
  fn->setDoesNotThrow();
  for (unsigned arg : {0u, 1u, 3u}) {
    fn->addParamAttr(arg, llvm::Attribute::NoAlias);
    fn->addParamAttr(arg, llvm::Attribute::NoCapture);
    fn->addParamAttr(arg, llvm::Attribute::NoUndef);
  }
  fn->addParamAttr(0, llvm::Attribute::ReadOnly);
  fn->addParamAttr(1, llvm::Attribute::ReadOnly);
  fn->addParamAttr(3, llvm::Attribute::WriteOnly);
  y_ = fn->getArg(0);
  p_ = fn->getArg(1);
  fn->getArg(3)->setName("out");
  y_->setName("y");
  p_->setName("p");
  fn->getArg(2)->setName("t");

  builder_.SetInsertPoint(llvm::BasicBlock::Create(ctx, "entry", fn));
  t_ = lanes_ > 1 ? builder_.CreateVectorSplat(lanes_, fn->getArg(2), "ts") : fn->getArg(2);
  // Strict IEEE arithmetic, no FMA contraction: native code then computes exactly what the
  // reference interpreter computes, bit for bit, and the two can be compared to 1e-12.
  builder_.clearFastMathFlags();

  values_.reserve(nodes.size());
  for (const ir::Node &n : nodes)
    values_.push_back(emitNode(n));
  for (size_t i = 0; i < kernel_.outputs.size(); ++i) {
    llvm::Value *slot = builder_.CreateConstInBoundsGEP1_64(double_, fn->getArg(3), i * lanes_);
    builder_.CreateAlignedStore(values_[kernel_.outputs[i]], slot, llvm::Align(8));
  }
  builder_.CreateRetVoid();
  return true;
}

llvm::Value *KernelEmitter::load(llvm::Value *base, int index, const char *name) {
  llvm::Value *slot = builder_.CreateConstInBoundsGEP1_64(double_, base, static_cast<uint64_t>(index) * lanes_);
  return builder_.CreateAlignedLoad(value_, slot, llvm::Align(8), name + std::to_string(index));
}

llvm::Value *KernelEmitter::truth(llvm::Value *v) {
  return builder_.CreateFCmpUNE(v, llvm::ConstantFP::get(value_, 0.0));
}

llvm::Value *KernelEmitter::libmCall(const char *name, llvm::Value *arg) {
  llvm::FunctionCallee callee = module_.getOrInsertFunction(name, double_, double_);
  if (auto *f = llvm::dyn_cast<llvm::Function>(callee.getCallee())) {
    // Pure like the intrinsics (as with -fno-math-errno), so O3 may hoist, share or vectorise it.
    f->setDoesNotAccessMemory();
    f->setDoesNotThrow();
    f->setWillReturn();
  }
  llvm::CallInst *call = builder_.CreateCall(callee, {arg});
  call->setDoesNotThrow();
  call->setDoesNotAccessMemory();
  return call;
}

llvm::Value *KernelEmitter::mathCall(const char *name, llvm::Value *a, llvm::Value *b) {
  std::string symbol = name;
  if (lanes_ > 1) {
    // The vector function ABI's names: b = SSE (2 lanes), d = AVX2 (4), e = AVX-512 (8).
    const char *isa = lanes_ == 2 ? "_ZGVbN2" : lanes_ == 4 ? "_ZGVdN4" : "_ZGVeN8";
    symbol = std::string(isa) + (b ? "vv_" : "v_") + name;
  }
  std::vector<llvm::Type *> params(b ? 2 : 1, value_);
  llvm::FunctionCallee callee = module_.getOrInsertFunction(symbol, llvm::FunctionType::get(value_, params, false));
  if (auto *f = llvm::dyn_cast<llvm::Function>(callee.getCallee())) {
    f->setDoesNotAccessMemory();
    f->setDoesNotThrow();
    f->setWillReturn();
  }
  llvm::CallInst *call = b ? builder_.CreateCall(callee, {a, b}) : builder_.CreateCall(callee, {a});
  call->setDoesNotThrow();
  call->setDoesNotAccessMemory();
  return call;
}

llvm::Value *KernelEmitter::emitNode(const ir::Node &n) {
  using ir::Op;
  auto a = [&] { return values_[n.a]; };
  auto b = [&] { return values_[n.b]; };
  switch (n.op) {
  case Op::Const: return llvm::ConstantFP::get(value_, n.constant);
  case Op::State: return load(y_, n.index, "y");
  case Op::Param: return load(p_, n.index, "p");
  case Op::Time: return t_;
  case Op::Add: return builder_.CreateFAdd(a(), b());
  case Op::Sub: return builder_.CreateFSub(a(), b());
  case Op::Mul: return builder_.CreateFMul(a(), b());
  case Op::Div: return builder_.CreateFDiv(a(), b());
  case Op::Neg: return builder_.CreateFNeg(a());
  case Op::Pow:
    return lanes_ > 1 ? mathCall("pow", a(), b()) : builder_.CreateBinaryIntrinsic(llvm::Intrinsic::pow, a(), b());
  case Op::Exp: return lanes_ > 1 ? mathCall("exp", a()) : builder_.CreateUnaryIntrinsic(llvm::Intrinsic::exp, a());
  case Op::Expm1: return lanes_ > 1 ? mathCall("expm1", a()) : libmCall("expm1", a());
  case Op::Log: return lanes_ > 1 ? mathCall("log", a()) : builder_.CreateUnaryIntrinsic(llvm::Intrinsic::log, a());
  case Op::Log10:
    return lanes_ > 1 ? mathCall("log10", a()) : builder_.CreateUnaryIntrinsic(llvm::Intrinsic::log10, a());
  case Op::Sqrt: return builder_.CreateUnaryIntrinsic(llvm::Intrinsic::sqrt, a());
  case Op::Abs: return builder_.CreateUnaryIntrinsic(llvm::Intrinsic::fabs, a());
  // minnum/maxnum are fmin/fmax: a NaN operand yields the other operand.
  case Op::Min: return builder_.CreateBinaryIntrinsic(llvm::Intrinsic::minnum, a(), b());
  case Op::Max: return builder_.CreateBinaryIntrinsic(llvm::Intrinsic::maxnum, a(), b());
  case Op::Tanh: return lanes_ > 1 ? mathCall("tanh", a()) : libmCall("tanh", a());
  // Ordered compares are false on NaN, like C++ <, <=, >, >=, ==; != is unordered (true on NaN).
  case Op::Lt: return toDouble(builder_.CreateFCmpOLT(a(), b()));
  case Op::Le: return toDouble(builder_.CreateFCmpOLE(a(), b()));
  case Op::Gt: return toDouble(builder_.CreateFCmpOGT(a(), b()));
  case Op::Ge: return toDouble(builder_.CreateFCmpOGE(a(), b()));
  case Op::Eq: return toDouble(builder_.CreateFCmpOEQ(a(), b()));
  case Op::Ne: return toDouble(builder_.CreateFCmpUNE(a(), b()));
  case Op::And: return toDouble(builder_.CreateAnd(truth(a()), truth(b())));
  case Op::Or: return toDouble(builder_.CreateOr(truth(a()), truth(b())));
  case Op::Not: return toDouble(builder_.CreateNot(truth(a())));
  // Both arms are already computed (straight-line IR), so a select costs no branch.
  case Op::Select: return builder_.CreateSelect(truth(a()), b(), values_[n.c]);
  }
  return nullptr; // unreachable: the switch covers IR.def
}

} // namespace

std::unique_ptr<llvm::Module> codegen(const ir::Kernel &kernel, llvm::LLVMContext &ctx, const std::string &functionName,
                                      int lanes) {
  auto module = std::make_unique<llvm::Module>(functionName, ctx);
  if (lanes != 1 && lanes != 2 && lanes != 4 && lanes != 8)
    return nullptr;
  if (!KernelEmitter(kernel, *module, lanes).emit(functionName))
    return nullptr;
  return module;
}

} // namespace saltpan
